// Baseline updates under flock(2): re-read under the lock, merge, write a temporary, rename it in.
#include "sim/analysis/baseline_store.hpp"

#include <fcntl.h>
#include <fmt/format.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <chrono>
#include <cstdlib>
#include <cstring>
#include <thread>

namespace settle {
namespace {

// Closes a descriptor when it goes out of scope.
struct fd_guard {
  int fd = -1;
  explicit fd_guard(int f = -1) : fd(f) {}
  ~fd_guard() { reset(); }
  fd_guard(const fd_guard&) = delete;
  fd_guard& operator=(const fd_guard&) = delete;
  void reset(int f = -1) {
    if (fd >= 0) ::close(fd);
    fd = f;
  }
};

// The file a path names: a symbolic link is followed, so the link stays and
// its target is replaced.
std::string resolved(const std::string& path) {
  struct stat st {};
  if (::lstat(path.c_str(), &st) == 0 && S_ISLNK(st.st_mode))
    if (char* real = ::realpath(path.c_str(), nullptr)) {
      std::string r = real;
      std::free(real);
      return r;
    }
  return path;
}

std::string folder_of(const std::string& path) {
  const auto slash = path.rfind('/');
  return slash == std::string::npos ? "." : slash == 0 ? "/" : path.substr(0, slash);
}

std::string name_of(const std::string& path) {
  const auto slash = path.rfind('/');
  return slash == std::string::npos ? path : path.substr(slash + 1);
}

// Writable both by access(2) and by the mode bits: root passes access() on
// any file, yet a file someone made read-only is not to be replaced.
bool may_write(const std::string& path, const struct stat& st, int how) {
  return ::access(path.c_str(), how) == 0 && (st.st_mode & (S_IWUSR | S_IWGRP | S_IWOTH)) != 0;
}

enum class lock_outcome { held, stopped, failed };

lock_outcome lock(int fd, const std::atomic<bool>* stop, const std::function<void()>& on_wait,
                  bool& waited) {
  if (::flock(fd, LOCK_EX | LOCK_NB) == 0) return lock_outcome::held;
  if (errno != EWOULDBLOCK) return lock_outcome::failed;
  if (!waited && on_wait) on_wait();
  waited = true;
  // The signal handlers restart blocked calls (SA_RESTART), so a blocking
  // flock would never see the stop flag: poll without blocking instead.
  for (;;) {
    if (stop && stop->load(std::memory_order_acquire)) return lock_outcome::stopped;
    if (::flock(fd, LOCK_EX | LOCK_NB) == 0) return lock_outcome::held;
    if (errno != EWOULDBLOCK && errno != EINTR) return lock_outcome::failed;
    std::this_thread::sleep_for(std::chrono::milliseconds(20));
  }
}

bool read_all(int fd, std::string& text) {
  char buf[1 << 14];
  for (;;) {
    const ssize_t n = ::read(fd, buf, sizeof buf);
    if (n == 0) return true;
    if (n < 0) {
      if (errno == EINTR) continue;
      return false;
    }
    text.append(buf, static_cast<std::size_t>(n));
  }
}

bool write_all(int fd, const std::string& text) {
  std::size_t done = 0;
  while (done < text.size()) {
    const ssize_t n = ::write(fd, text.data() + done, text.size() - done);
    if (n < 0) {
      if (errno == EINTR) continue;
      return false;
    }
    done += static_cast<std::size_t>(n);
  }
  return true;
}

}  // namespace

std::string baseline_unwritable(const std::string& path) {
  const std::string target = resolved(path);
  struct stat st {};
  if (::stat(target.c_str(), &st) == 0) {
    if (!S_ISREG(st.st_mode)) return "it is not a regular file";
    if (!may_write(target, st, W_OK))
      return fmt::format("the file is read-only (mode {:04o})", st.st_mode & 07777);
  } else if (errno != ENOENT) {
    return std::strerror(errno);
  }
  const std::string dir = folder_of(target);
  struct stat ds {};
  if (::stat(dir.c_str(), &ds) != 0)
    return fmt::format("its folder '{}': {}", dir, std::strerror(errno));
  if (!S_ISDIR(ds.st_mode)) return fmt::format("'{}' is not a folder", dir);
  if (!may_write(dir, ds, W_OK | X_OK))
    return fmt::format(
        "its folder '{}' is not writable (the new file is written there and renamed into place)",
        dir);
  return {};
}

baseline_update_result update_baseline_file(const std::string& path, const baseline_entry& entry,
                                            const std::string& written_by,
                                            const std::atomic<bool>* stop,
                                            const std::function<void()>& on_wait) {
  baseline_update_result res;
  auto failed = [&](std::string why) {
    res.status = baseline_update_status::failed;
    res.error = std::move(why);
    return res;
  };
  auto stopped = [&] {
    res.status = baseline_update_status::stopped;
    return res;
  };
  const std::string target = resolved(path);
  const std::string dir = folder_of(target), name = name_of(target);
  const std::string lock_path = fmt::format("{}/.{}.lock", dir, name.substr(0, 200));
  bool waited = false;
  for (;;) {
    fd_guard file(::open(target.c_str(), O_RDONLY | O_CLOEXEC));
    fd_guard creators;  // held while no file exists yet
    if (file.fd < 0) {
      if (errno != ENOENT) return failed(std::strerror(errno));
      creators.reset(::open(lock_path.c_str(), O_RDWR | O_CREAT | O_CLOEXEC, 0666));
      if (creators.fd < 0)
        return failed(
            fmt::format("cannot create the lock file '{}': {}", lock_path, std::strerror(errno)));
      switch (lock(creators.fd, stop, on_wait, waited)) {
        case lock_outcome::held:
          break;
        case lock_outcome::stopped:
          return stopped();
        case lock_outcome::failed:
          return failed(fmt::format("cannot lock '{}': {}", lock_path, std::strerror(errno)));
      }
      // Another creator may have finished while this one waited: then lock
      // the file it wrote instead.
      if (::access(target.c_str(), F_OK) == 0) continue;
    } else {
      switch (lock(file.fd, stop, on_wait, waited)) {
        case lock_outcome::held:
          break;
        case lock_outcome::stopped:
          return stopped();
        case lock_outcome::failed:
          return failed(fmt::format("cannot lock it: {}", std::strerror(errno)));
      }
      // A process that held the lock before may have renamed a new file
      // over this one: the lock held is then on a file no longer there.
      struct stat held {
      }, now{};
      if (::fstat(file.fd, &held) != 0) return failed(std::strerror(errno));
      if (::stat(target.c_str(), &now) != 0 || now.st_dev != held.st_dev ||
          now.st_ino != held.st_ino)
        continue;
    }

    // Under the lock: the file as it is now, not as it was when the search began.
    baseline_file f;
    struct stat old {};
    const bool had_file = file.fd >= 0;
    if (had_file) {
      // It may have been made read-only while the search ran.
      if (::fstat(file.fd, &old) == 0 && !may_write(target, old, W_OK))
        return failed(fmt::format("the file is read-only (mode {:04o})", old.st_mode & 07777));
      std::string text;
      if (::fstat(file.fd, &old) != 0 || !read_all(file.fd, text))
        return failed(fmt::format("cannot read it: {}", std::strerror(errno)));
      std::string err;
      auto parsed = parse_baseline(text, &err);
      if (!parsed) return failed(err);
      f = std::move(*parsed);
    }
    f.format_version = baseline_format_version;  // older files are rewritten in the current format
    f.written_by = written_by;
    merge_entry(f, entry);
    const std::string text = baseline_text(f);

    std::string temp = fmt::format("{}/.{}.tmp.XXXXXX", dir, name.substr(0, 200));
    fd_guard out(::mkstemp(temp.data()));
    if (out.fd < 0)
      return failed(
          fmt::format("cannot create a temporary file in '{}': {}", dir, std::strerror(errno)));
    auto drop = [&](std::string why) {
      ::unlink(temp.c_str());
      return failed(std::move(why));
    };
    if (had_file) {
      // Keep the old file's permissions and group (and owner, for root).
      if (::fchmod(out.fd, old.st_mode & 07777) != 0)
        return drop(fmt::format("cannot set the mode: {}", std::strerror(errno)));
      const uid_t owner = ::geteuid() == 0 ? old.st_uid : static_cast<uid_t>(-1);
      if (::fchown(out.fd, owner, old.st_gid) != 0)
        res.warning =
            fmt::format("could not keep its group (gid {}): {}", old.st_gid, std::strerror(errno));
    } else {
      const mode_t mask = ::umask(0);
      ::umask(mask);
      ::fchmod(out.fd, 0666 & ~mask);  // mkstemp makes 0600; give what a plain create would
    }
    if (!write_all(out.fd, text) || ::fsync(out.fd) != 0)
      return drop(fmt::format("cannot write it: {}", std::strerror(errno)));
    if (::close(out.fd) != 0) {
      out.fd = -1;
      return drop(fmt::format("cannot write it: {}", std::strerror(errno)));
    }
    out.fd = -1;
    if (stop && stop->load(std::memory_order_acquire)) {
      ::unlink(temp.c_str());
      return stopped();
    }
    if (::rename(temp.c_str(), target.c_str()) != 0)
      return drop(fmt::format("cannot rename the new file into place: {}", std::strerror(errno)));
    // The creators' lock file has served once the file exists; waiters on it
    // find the file and lock that instead.
    if (creators.fd >= 0) ::unlink(lock_path.c_str());
    res.status = baseline_update_status::written;
    return res;
  }
}

}  // namespace settle
