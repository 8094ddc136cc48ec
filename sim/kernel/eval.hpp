// Ternary evaluation of one gate: the exact ternary extension of its function.
#pragma once

#include "sim/model/netlist.hpp"

namespace settle {

/// Evaluates gate g over the net values `v` (indexed by net id). `present` is
/// the gate's present output, read by holding gates (C-elements). The result
/// is binary exactly when every binary resolution of the x inputs (and of an x
/// present output, for holding gates) gives the same value (Eichelberger 1965).
logic eval_gate(const netlist& n, gate_id g, const logic* v, logic present);

}  // namespace settle
