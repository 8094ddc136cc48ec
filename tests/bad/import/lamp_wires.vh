// lamp_wires.vh - a fragment of a module body (a wire), for the `include case of tests/bad.
wire spare;
