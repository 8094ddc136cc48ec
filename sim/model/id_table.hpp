// A hash set of 32-bit ids whose keys live elsewhere: the one hash set of the project
// (net and instance names, delay records, explored circuit states).
#pragma once

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <vector>

namespace settle {

/// The id meaning "none" (no net, no gate, no state; an empty slot below).
inline constexpr std::uint32_t no_id = UINT32_MAX;

/// An open-addressing hash set of 32-bit ids whose keys live elsewhere (4
/// bytes a slot, at most half full). The caller supplies hashes and equality.
class id_table {
 public:
  /// The stored id with hash `h` for which `same(id)` holds, or no_id.
  template <typename Same>
  std::uint32_t find(std::size_t h, Same same) const {
    if (slots_.empty()) return no_id;
    const std::size_t mask = slots_.size() - 1;
    for (std::size_t i = h & mask;; i = (i + 1) & mask) {
      const std::uint32_t v = slots_[i];
      if (v == no_id || same(v)) return v;
    }
  }
  /// Stores `id` (not yet present) with hash `h`; `hash_of(id)` rehashes stored ids when the table
  /// grows.
  template <typename HashOf>
  void insert(std::size_t h, std::uint32_t id, HashOf hash_of) {
    if ((used_ + 1) * 2 > slots_.size())
      rebuild(std::max<std::size_t>(16, slots_.size() * 2), hash_of);
    place(h, id);
    ++used_;
  }
  /// Makes room for `n` ids without growing.
  template <typename HashOf>
  void reserve(std::size_t n, HashOf hash_of) {
    std::size_t cap = 16;
    while (cap < 2 * n) cap *= 2;
    if (cap > slots_.size()) rebuild(cap, hash_of);
  }
  std::size_t size() const { return used_; }
  /// Bytes held by the slots.
  std::size_t bytes() const { return slots_.capacity() * sizeof(std::uint32_t); }

 private:
  void place(std::size_t h, std::uint32_t id) {
    const std::size_t mask = slots_.size() - 1;
    std::size_t i = h & mask;
    while (slots_[i] != no_id) i = (i + 1) & mask;
    slots_[i] = id;
  }
  template <typename HashOf>
  void rebuild(std::size_t cap, HashOf hash_of) {
    std::vector<std::uint32_t> old(cap, no_id);
    old.swap(slots_);
    for (auto v : old)
      if (v != no_id) place(hash_of(v), v);
  }
  std::vector<std::uint32_t> slots_;
  std::size_t used_ = 0;
};

}  // namespace settle
