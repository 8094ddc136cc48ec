// The one check of invariants: SETTLE_CHECK(cond, "what") aborts with file:line and the text.
#pragma once

#include <cstdio>
#include <cstdlib>

namespace settle::detail {

/// SETTLE_CHECK's failure path: says where and what on stderr, then aborts.
[[noreturn, gnu::cold, gnu::noinline]] inline void check_failed(const char* file, int line,
                                                                const char* what,
                                                                const char* cond) noexcept {
  std::fprintf(stderr, "%s:%d: internal check failed: %s (%s)\n", file, line, what, cond);
  std::fflush(stderr);
  std::abort();
}

}  // namespace settle::detail

/// Aborts the process when `cond` is false, after printing file:line, `what`
/// (a string literal) and the condition on stderr. Kept in every build type
/// (NDEBUG does not remove it). For invariants of the code only: bad input
/// is a diagnostic, never a failed check.
#define SETTLE_CHECK(cond, what)                \
  (__builtin_expect(static_cast<bool>(cond), 1) \
       ? void(0)                                \
       : ::settle::detail::check_failed(__FILE__, __LINE__, what, #cond))
