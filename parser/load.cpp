// The loading facade: file I/O, format dispatch, parse + elaborate, and --stim replacement.
#include "parser/load.hpp"

#include <fcntl.h>
#include <fmt/format.h>
#include <sys/mman.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <memory>
#include <vector>

#include "parser/ir.hpp"
#include "parser/verilog.hpp"

namespace settle {
namespace {

/// A file's text: mapped when it is a regular file (so that its pages can be
/// dropped once read), otherwise read into memory.
class source_text {
 public:
  source_text() = default;
  source_text(const source_text&) = delete;
  source_text& operator=(const source_text&) = delete;
  ~source_text() {
    if (map_) ::munmap(map_, size_);
  }

  bool open(const std::string& path, diagnostics& diags) {
    int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
    if (fd < 0) return fail(path, diags, fmt::format("cannot open file: {}", std::strerror(errno)));
    struct stat st {};
    if (::fstat(fd, &st) == 0 && S_ISDIR(st.st_mode)) {
      ::close(fd);
      return fail(path, diags, "cannot read file: it is a directory");
    }
    if (::fstat(fd, &st) == 0 && S_ISREG(st.st_mode) && st.st_size > 0) {
      void* p =
          ::mmap(nullptr, static_cast<std::size_t>(st.st_size), PROT_READ, MAP_PRIVATE, fd, 0);
      if (p != MAP_FAILED) {
        ::close(fd);
        map_ = p;
        size_ = static_cast<std::size_t>(st.st_size);
        return true;
      }
    }
    // Pipes, devices, empty files, or no mapping: read it all.
    char buf[1 << 16];
    for (;;) {
      auto n = ::read(fd, buf, sizeof buf);
      if (n < 0 && errno == EINTR) continue;
      if (n < 0) {
        const int err = errno;
        ::close(fd);
        return fail(path, diags, fmt::format("cannot read file: {}", std::strerror(err)));
      }
      if (n == 0) break;
      data_.append(buf, static_cast<std::size_t>(n));
    }
    ::close(fd);
    return true;
  }

  std::string_view view() const {
    return map_ ? std::string_view(static_cast<const char*>(map_), size_) : std::string_view(data_);
  }

  /// Drops the resident pages before `upto` (mapped files only).
  void release(std::size_t upto) {
    if (!map_) return;
    const auto page = static_cast<std::size_t>(::sysconf(_SC_PAGESIZE));
    upto = std::min(upto, size_) / page * page;
    if (upto) ::madvise(map_, upto, MADV_DONTNEED);
  }

 private:
  static bool fail(const std::string& path, diagnostics& diags, std::string why) {
    diagnostic d;
    d.file = path;
    d.message = std::move(why);
    diags.add(std::move(d));
    return false;
  }
  void* map_ = nullptr;
  std::size_t size_ = 0;
  std::string data_;
};

bool ends_with(const std::string& s, std::string_view suffix) {
  return s.size() >= suffix.size() &&
         s.compare(s.size() - suffix.size(), suffix.size(), suffix) == 0;
}

/// Orders this load's diagnostics by position (file-less ones first), keeping emission order
/// otherwise.
void sort_from(diagnostics& diags, std::size_t first) {
  std::stable_sort(diags.items.begin() + static_cast<std::ptrdiff_t>(first), diags.items.end(),
                   [](const diagnostic& a, const diagnostic& b) {
                     if (a.file != b.file) return false;
                     return a.line != b.line ? a.line < b.line : a.col < b.col;
                   });
}

/// Parses a --stim file and rebuilds the design's stimulus from it.
bool apply_stim_file(design& d, const std::string& path, diagnostics& diags) {
  source_text src;
  if (!src.open(path, diags)) return false;
  const std::string_view text = src.view();
  const auto first = diags.items.size();
  ir::reporter rep(text, path, diags);
  ir::file f;
  ir::parse_file(text, ir::file_mode::stimulus_only, f, rep);
  if (!rep.errors() && !f.stim.present)
    rep.error({}, "the stimulus file holds no stimulus { } block");
  if (!rep.errors()) ir::build_stimulus(f.stim, d.nets, d.stim, rep);
  sort_from(diags, first);
  return rep.errors() == 0;
}

/// The file a path names (device and inode), when it exists.
struct file_id {
  dev_t dev = 0;
  ino_t ino = 0;
  bool operator==(const file_id&) const = default;
};
std::optional<file_id> identify(const std::string& path) {
  struct stat st {};
  if (::stat(path.c_str(), &st) != 0) return std::nullopt;
  return file_id{st.st_dev, st.st_ino};
}

/// Reads the Verilog files a .settle file imports and appends their modules
/// to its blocks. Each path is relative to the importing file's folder.
void read_imports(ir::file& f, const std::string& name, const load_options& opt, ir::reporter& rep,
                  diagnostics& diags, std::vector<std::unique_ptr<verilog_library>>& libs) {
  const auto self = identify(name);
  std::vector<std::pair<file_id, source_loc>> seen;
  // Block names so far: the .settle file's own, then each import's modules.
  std::vector<std::pair<std::string, std::string>> names;  // name, where
  for (auto& b : f.blocks)
    names.emplace_back(std::string(b.id.name), fmt::format("{}:{}", b.id.loc.line, b.id.loc.col));
  const auto slash = name.rfind('/');
  for (auto& imp : f.imports) {
    std::string path = imp.path;
    if (path.front() != '/' && slash != std::string::npos) path = name.substr(0, slash + 1) + path;
    const auto id = identify(path);
    if (id && self && *id == *self) {
      rep.error(imp.loc, fmt::format("import cycle: '{}' imports itself", name));
      continue;
    }
    bool twice = false;
    for (auto& [other, at] : seen)
      if (id && other == *id) {
        rep.error(imp.loc,
                  fmt::format("'{}' is already imported at {}:{}", imp.path, at.line, at.col));
        twice = true;
      }
    if (twice) continue;
    if (ends_with(path, ".settle")) {
      rep.error(imp.loc, fmt::format("'{}' is a .settle file; 'import' reads structural "
                                     "Verilog (.v) files",
                                     imp.path));
      continue;
    }
    diagnostics opened;
    source_text src;
    if (!src.open(path, opened)) {
      const auto& why = opened.items.front().message;
      rep.error(imp.loc, path == imp.path
                             ? fmt::format("cannot import '{}': {}", imp.path, why)
                             : fmt::format("cannot import '{}' ({}): {}", imp.path, path, why));
      continue;
    }
    if (id) seen.emplace_back(*id, imp.loc);
    const auto before = diags.items.size();
    auto lib = read_verilog_library(std::string(src.view()), path, opt, diags);
    if (diags.items.size() > before) {  // say once where the file came in
      diagnostic here;
      here.severity = diagnostic::level::note;
      here.file = name;
      here.line = imp.loc.line;
      here.col = imp.loc.col;
      here.message = fmt::format("'{}' is imported here", imp.path);
      set_source_line(here, rep.line_text(imp.loc.line));
      diags.items[before].notes.push_back(std::move(here));
    }
    for (std::size_t m = 0; m < lib->modules.size(); ++m) {
      const std::string mod(lib->modules[m].id.name);
      for (auto& [other, at] : names)
        if (other == mod)
          rep.error(imp.loc, fmt::format("module '{}' of '{}' (at {}) has the name of the block "
                                         "defined at {}",
                                         mod, imp.path, lib->module_where[m], at));
      names.emplace_back(mod, lib->module_where[m]);
    }
    libs.push_back(std::move(lib));
  }
  if (rep.errors()) return;
  for (auto& lib : libs)
    for (auto& m : lib->modules) f.blocks.push_back(std::move(m));
}

/// Parses and elaborates a .settle text; `src`, when given, is the mapped file
/// the text views, whose pages are dropped once read.
std::optional<design> load_settle(std::string_view text, const std::string& name,
                                  const load_options& opt, diagnostics& diags, source_text* src) {
  const auto first = diags.items.size();
  ir::reporter rep(text, name, diags);
  ir::file f;
  ir::parse_file(text, ir::file_mode::design, f, rep);
  if (src) {
    src->release(text.size());
    f.release_text = [src](std::size_t upto) { src->release(upto); };
  }
  // The imported modules' names and reporters live until the netlist is built.
  std::vector<std::unique_ptr<verilog_library>> libs;
  auto errors = [&] {
    std::size_t n = rep.errors();
    for (auto& lib : libs) n += lib->errors();
    return n;
  };
  if (!rep.errors() && !f.imports.empty()) read_imports(f, name, opt, rep, diags, libs);
  design d;
  d.path = name;
  if (!errors()) {
    ir::elaborate(f, d.nets, rep);
    if (!errors()) ir::build_stimulus(f.stim, d.nets, d.stim, rep);
  } else {
    ir::check_top_gates(f, rep);
  }
  sort_from(diags, first);
  if (errors()) return std::nullopt;
  d.source.format = "settle";
  d.source.inputs = static_cast<std::uint32_t>(d.nets.inputs.size());
  d.source.outputs = static_cast<std::uint32_t>(d.nets.outputs.size());
  d.source.gates = static_cast<std::uint32_t>(d.nets.gate_count());
  d.nets.blocks = static_cast<std::uint32_t>(f.blocks.size());
  return d;
}

}  // namespace

std::optional<design> load_design_text(std::string_view text, const std::string& name,
                                       const load_options& opt, diagnostics& diags) {
  if (opt.format == "bench") return load_bench_text(text, name, opt, diags);
  if (opt.format == "verilog") return load_verilog_text(text, name, opt, diags);
  return load_settle(text, name, opt, diags, nullptr);
}

std::optional<design> load_design(const std::string& path, const load_options& opt,
                                  diagnostics& diags) {
  if (opt.format != "auto" && opt.format != "settle" && opt.format != "bench" &&
      opt.format != "verilog") {
    diagnostic d;
    d.file = path;
    d.message = fmt::format("unknown format '{}' (use auto, settle, bench or verilog)", opt.format);
    diags.add(std::move(d));
    return std::nullopt;
  }
  source_text src;
  if (!src.open(path, diags)) return std::nullopt;
  const std::string_view text = src.view();
  load_options o = opt;
  if (o.format == "auto")
    o.format = ends_with(path, ".bench") ? "bench" : ends_with(path, ".v") ? "verilog" : "settle";
  auto d = o.format == "bench"     ? load_bench_text(text, path, o, diags)
           : o.format == "verilog" ? load_verilog_text(text, path, o, diags)
                                   : load_settle(text, path, o, diags, &src);
  if (!d) return d;
  d->path = path;
  if (!opt.stim_path.empty() && !apply_stim_file(*d, opt.stim_path, diags)) return std::nullopt;
  return d;
}

}  // namespace settle
