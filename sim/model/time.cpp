// The per-step time limit check shared by every command that takes --horizon.
#include "sim/model/time.hpp"

#include <fmt/format.h>

namespace settle {

bool horizon_ok(time_fs horizon, std::string& why) {
  if (horizon == 0) {
    why = "must be greater than 0";
    return false;
  }
  if (horizon > time_last) {
    why = fmt::format("{}fs passes the end of representable time (the last instant is {}fs)",
                      horizon, time_last);
    return false;
  }
  return true;
}

}  // namespace settle
