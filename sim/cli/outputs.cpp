// Atomic output files, all-or-nothing output sets, and the identity check of outputs against
// inputs.
#include "sim/cli/outputs.hpp"

#include <fmt/format.h>
#include <fnmatch.h>
#include <spdlog/spdlog.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <climits>
#include <cstdlib>
#include <cstring>
#include <optional>

#include "sim/cli/interrupt.hpp"

namespace settle::cli {
namespace {

// "'-' (standard output)" for stdout, the path in quotes otherwise.
std::string shown(const std::string& path) {
  return path == "-" ? "'-' (standard output)" : "'" + path + "'";
}

// The folder and last name of a path ("." for a bare name).
std::pair<std::string, std::string> split(const std::string& path) {
  std::string p = path;
  while (p.size() > 1 && p.back() == '/') p.pop_back();
  const auto slash = p.rfind('/');
  if (slash == std::string::npos) return {".", p};
  return {slash == 0 ? "/" : p.substr(0, slash), p.substr(slash + 1)};
}

}  // namespace

bool atomic_file::open() {
  if (path_.empty()) {
    spdlog::error("cannot write to an empty path");
    return false;
  }
  if (path_ == "-") {
    file_ = std::tmpfile();
    if (file_)
      spooled_ = true;
    else
      file_ = stdout, direct_ = true;  // no spool: stream straight out
    return true;
  }
  target_ = path_;
  struct stat st {};
  if (::lstat(path_.c_str(), &st) == 0 && S_ISLNK(st.st_mode)) {
    // Replace what the link points at, not the link.
    if (char* real = ::realpath(path_.c_str(), nullptr)) target_ = real, std::free(real);
  }
  if (::stat(target_.c_str(), &st) == 0 && !S_ISREG(st.st_mode)) {
    if (S_ISDIR(st.st_mode)) {
      spdlog::error("cannot write '{}': it is a directory", path_);
      return false;
    }
    // A device or FIFO: renaming would replace the device, so spool and copy.
    file_ = std::tmpfile();
    if (file_) {
      spooled_ = true;
      return true;
    }
    file_ = std::fopen(target_.c_str(), "w");
    if (!file_) {
      spdlog::error("cannot write '{}': {}", path_, std::strerror(errno));
      return false;
    }
    direct_ = true;
    return true;
  }
  const auto [dir, base] = split(target_);
  // The temporary's name stays within NAME_MAX however long the target's is.
  std::string templ = fmt::format("{}/.{}.tmp.XXXXXX", dir, base.substr(0, 200));
  int fd = -1, err = 0;
  {
    const signals_held held;  // created and registered before a signal can end the process
    fd = ::mkstemp(templ.data());
    err = errno;
    if (fd >= 0) {
      temp_ = templ;
      slot_ = register_temporary(temp_.c_str());
    }
  }
  if (fd < 0) {
    spdlog::error("cannot write '{}': {}", path_, std::strerror(err));
    return false;
  }
  // mkstemp creates 0600; give the file the permissions a plain create would.
  const mode_t mask = ::umask(0);
  ::umask(mask);
  ::fchmod(fd, 0666 & ~mask);
  file_ = ::fdopen(fd, "w");
  if (!file_) {
    const int err = errno;
    ::close(fd);
    forget_temporary();
    spdlog::error("cannot write '{}': {}", path_, std::strerror(err));
    return false;
  }
  return true;
}

void atomic_file::forget_temporary() {
  if (temp_.empty()) return;
  ::unlink(temp_.c_str());
  unregister_temporary(slot_);
  slot_ = -1;
  temp_.clear();
}

bool atomic_file::finish() {
  if (finished_) return true;
  if (!file_) return false;
  const bool flushed = std::fflush(file_) == 0 && !std::ferror(file_);
  const int err = errno;
  if (spooled_ || direct_) {
    if (!flushed) {
      spdlog::error("cannot write {}: {}", shown(path_), std::strerror(err));
      return false;
    }
    finished_ = true;
    return true;
  }
  const bool closed = std::fclose(file_) == 0;
  const int close_err = errno;
  file_ = nullptr;
  if (!flushed || !closed) {
    spdlog::error("cannot write '{}': {}", path_, std::strerror(flushed ? close_err : err));
    forget_temporary();
    return false;
  }
  finished_ = true;
  return true;
}

bool atomic_file::publish() {
  if (!finished_) return false;
  if (direct_) {
    direct_ = finished_ = false;
    if (file_ == stdout) {
      file_ = nullptr;
      return true;
    }
    const bool closed = std::fclose(file_) == 0;
    file_ = nullptr;
    if (closed) return true;
    spdlog::error("cannot write '{}': {}", path_, std::strerror(errno));
    return false;
  }
  if (spooled_) {
    // Copy the spool to the device or to stdout.
    std::FILE* spool = file_;
    file_ = nullptr;
    spooled_ = finished_ = false;
    std::FILE* out = path_ == "-" ? stdout : std::fopen(target_.c_str(), "w");
    if (!out) {
      spdlog::error("cannot write '{}': {}", path_, std::strerror(errno));
      std::fclose(spool);
      return false;
    }
    std::rewind(spool);
    char buf[1 << 16];
    bool ok = true;
    for (std::size_t n; ok && (n = std::fread(buf, 1, sizeof buf, spool)) > 0;)
      ok = std::fwrite(buf, 1, n, out) == n;
    ok = ok && !std::ferror(spool) && std::fflush(out) == 0 && !std::ferror(out);
    const int err = errno;
    std::fclose(spool);
    if (out != stdout) ok = std::fclose(out) == 0 && ok;
    if (!ok) spdlog::error("cannot write {}: {}", shown(path_), std::strerror(err));
    return ok;
  }
  finished_ = false;
  if (::rename(temp_.c_str(), target_.c_str()) != 0) {
    spdlog::error("cannot write '{}': {}", path_, std::strerror(errno));
    forget_temporary();
    return false;
  }
  unregister_temporary(slot_);
  slot_ = -1;
  temp_.clear();
  return true;
}

bool atomic_file::commit() { return finish() && publish(); }

void atomic_file::discard() {
  if (file_ && file_ != stdout) std::fclose(file_);
  file_ = nullptr;
  spooled_ = direct_ = finished_ = false;
  forget_temporary();
}

bool write_output(const std::string& path, std::string_view text) {
  atomic_file f(path);
  if (!f.open()) return false;
  if (std::fwrite(text.data(), 1, text.size(), f.get()) != text.size()) {
    spdlog::error("cannot write {}: {}", shown(path), std::strerror(errno));
    return false;
  }
  return f.commit();
}

std::FILE* output_set::open(const std::string& path) {
  auto f = std::make_unique<atomic_file>(path);
  if (!f->open()) {
    discard();
    return nullptr;
  }
  files_.push_back(std::move(f));
  return files_.back()->get();
}

bool output_set::put(const std::string& path, std::string_view text) {
  std::FILE* f = open(path);
  if (!f) return false;
  std::fwrite(text.data(), 1, text.size(), f);  // an error shows in ferror, which finish() tests
  return finish_last();
}

bool output_set::finish_last() {
  if (files_.empty()) return false;
  if (files_.back()->finish()) return true;
  discard();
  return false;
}

bool output_set::commit() {
  for (auto& f : files_)
    if (!f->finish()) {
      discard();
      return false;
    }
  // Devices and stdout first: they are the ones that can still fail (a full
  // device); a rename within one folder replaces its target in one step.
  std::vector<bool> to_device;
  for (auto& f : files_)
    to_device.push_back(f->get() != nullptr);  // finished regular files are closed
  for (int pass = 0; pass < 2; ++pass)
    for (std::size_t i = 0; i < files_.size(); ++i) {
      if (to_device[i] != (pass == 0)) continue;
      if (!files_[i]->publish()) {
        discard();
        return false;
      }
    }
  files_.clear();
  return true;
}

void output_set::discard() { files_.clear(); }

namespace {

// Identity of a path: the file it names after symbolic links, or for a path
// that does not exist yet, its folder and last name.
struct identity {
  dev_t dev = 0;
  ino_t ino = 0;
  std::string name;  ///< empty when the file exists
  bool valid = false;
  bool same_file(const identity& o) const {
    return valid && o.valid && dev == o.dev && ino == o.ino && name == o.name;
  }
};

identity identify(const std::string& path) {
  identity id;
  struct stat st {};
  if (::stat(path.c_str(), &st) == 0) {
    // A character device (/dev/null, a terminal) loses nothing to a write:
    // two outputs may share it.
    if (S_ISCHR(st.st_mode)) return id;
    id.dev = st.st_dev, id.ino = st.st_ino, id.valid = true;
    return id;
  }
  std::string where = path;
  // A dangling symbolic link: the file would be created where it points.
  char buf[PATH_MAX];
  for (int hops = 0; hops < 40; ++hops) {
    const auto n = ::readlink(where.c_str(), buf, sizeof buf - 1);
    if (n <= 0) break;
    std::string to(buf, static_cast<std::size_t>(n));
    where = to[0] == '/' ? to : split(where).first + "/" + to;
  }
  const auto [dir, base] = split(where);
  if (::stat(dir.c_str(), &st) != 0) return id;  // the write will fail with its own message
  id.dev = st.st_dev, id.ino = st.st_ino, id.name = base, id.valid = true;
  return id;
}

// The identity of the folder `path` lies in, and its last name.
identity folder_of(const std::string& path) {
  identity id;
  struct stat st {};
  const auto [dir, base] = split(path);
  if (::stat(dir.c_str(), &st) != 0) return id;
  id.dev = st.st_dev, id.ino = st.st_ino, id.name = base, id.valid = true;
  return id;
}

std::string role(const path_use& u) { return u.option + " " + u.path; }

}  // namespace

bool check_paths(const std::vector<path_use>& uses) {
  std::vector<identity> ids;
  ids.reserve(uses.size());
  for (const auto& u : uses)
    ids.push_back(u.path.empty() || u.path == "-" ? identity{} : identify(u.path));
  for (std::size_t i = 0; i < uses.size(); ++i) {
    if (uses[i].what == path_use::kind::input) continue;
    for (std::size_t j = 0; j < uses.size(); ++j) {
      if (j == i || (j < i && uses[j].what != path_use::kind::input))
        continue;  // each pair of outputs once
      const auto& a = uses[i];
      const auto& b = uses[j];
      if (ids[i].same_file(ids[j])) {
        if (b.what == path_use::kind::input)
          spdlog::error("{} is the {}", role(a), role(b));
        else
          spdlog::error("{} is the same file as {}", role(uses[std::max(i, j)]),
                        role(uses[std::min(i, j)]));
        return false;
      }
      // A file inside an output folder whose name the folder's outputs may take.
      if (a.what == path_use::kind::output_folder && ids[i].valid && ids[i].name.empty() &&
          !b.path.empty() && b.path != "-") {
        const identity in = folder_of(b.path);
        if (in.valid && in.dev == ids[i].dev && in.ino == ids[i].ino &&
            ::fnmatch(a.pattern.c_str(), in.name.c_str(), 0) == 0) {
          spdlog::error("{} lies in {}, where files named {} are written", role(b), role(a),
                        a.pattern);
          return false;
        }
      }
      if (b.what == path_use::kind::output_folder && ids[j].valid && ids[j].name.empty() &&
          !a.path.empty() && a.path != "-") {
        const identity in = folder_of(a.path);
        if (in.valid && in.dev == ids[j].dev && in.ino == ids[j].ino &&
            ::fnmatch(b.pattern.c_str(), in.name.c_str(), 0) == 0) {
          spdlog::error("{} lies in {}, where files named {} are written", role(a), role(b),
                        b.pattern);
          return false;
        }
      }
    }
  }
  return true;
}

}  // namespace settle::cli
