// The spelling of an enum's values in the reports, from a table in the enum's order.
#pragma once

#include <cstddef>

namespace settle {

/// names[e], or "?" for a value beyond the table. `Last` is the enum's last
/// value: a table that does not name every value fails to compile.
template <auto Last, class E, std::size_t N>
constexpr const char* enum_name(E e, const char* const (&names)[N]) {
  static_assert(N == static_cast<std::size_t>(Last) + 1, "one name per value, in order");
  const auto i = static_cast<std::size_t>(e);
  return i < N ? names[i] : "?";
}

}  // namespace settle
