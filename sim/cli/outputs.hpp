// Output files of a command: atomic writes, all-or-nothing sets of outputs, and the check that no
// output is an input.
#pragma once

#include <cstdio>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

namespace settle::cli {

/// A file written under a temporary name in its target's folder and renamed
/// into place by publish() (rename(2) replaces the target in one step, POSIX);
/// discarded (unlinked) otherwise. "-" is stdout. A target that is a device or
/// FIFO cannot be replaced by a rename: its content is spooled to an anonymous
/// temporary file and copied to it by publish(). A symbolic link is followed,
/// so the link stays. Every temporary is registered with the signal handlers
/// (interrupt.hpp), which remove it if the process is ended by a signal.
class atomic_file {
 public:
  explicit atomic_file(std::string path) : path_(std::move(path)) {}
  ~atomic_file() { discard(); }
  atomic_file(const atomic_file&) = delete;
  atomic_file& operator=(const atomic_file&) = delete;
  /// Creates the temporary file; on failure prints a message naming the path.
  bool open();
  std::FILE* get() const { return file_; }
  const std::string& path() const { return path_; }
  /// Flushes and closes the temporary (a spool stays open); the target is
  /// untouched. Prints a message naming the path on failure.
  bool finish();
  /// Puts the finished content in place: renames the temporary over the
  /// target, or copies the spool to the device or stdout. Prints a message on
  /// failure.
  bool publish();
  /// finish() then publish().
  bool commit();
  /// Closes and removes the temporary file (nothing appears at the path).
  void discard();

 private:
  void forget_temporary();
  std::string path_, temp_, target_;
  std::FILE* file_ = nullptr;
  int slot_ = -1;          ///< the temporary's slot with the signal handlers
  bool spooled_ = false;   ///< a device, a FIFO or stdout: the content waits in an anonymous file
  bool direct_ = false;    ///< no spool could be made: written in place as it comes
  bool finished_ = false;  ///< finish() succeeded
};

/// Writes `text` to `path` atomically: a temporary file in the target's folder,
/// renamed into place only on success. "-" writes to stdout. On failure prints
/// a message naming the path and returns false (the command then exits 2).
bool write_output(const std::string& path, std::string_view text);

/// All the outputs of one command, written as one: each goes to its temporary
/// file, and only when every one of them has been written completely are
/// they put in place (devices and stdout first, then the renames). When any
/// fails, every temporary is removed and every target stays as it was.
class output_set {
 public:
  /// Opens `path`'s temporary; returns the stream to write, or null after
  /// printing why (the command then exits 2).
  std::FILE* open(const std::string& path);
  /// Opens `path` and writes `text` as its whole content; false after
  /// printing why. A write error is reported by commit().
  bool put(const std::string& path, std::string_view text);
  /// Finishes the file opened last (flushes and closes its temporary, so a
  /// command writing many files keeps few open); false after printing why,
  /// with every temporary removed.
  bool finish_last();
  /// Finishes every file, then publishes every one; false after printing why.
  bool commit();
  /// Removes every temporary; nothing is published.
  void discard();
  bool empty() const { return files_.empty(); }

 private:
  std::vector<std::unique_ptr<atomic_file>> files_;
};

/// A path a command reads or writes, for check_paths.
struct path_use {
  enum class kind { input, output, output_folder } what;
  std::string option;  ///< how the user named it: "--json", "the design file", "--vcd-dir"
  std::string path;
  /// For an output_folder, the glob(7) pattern of the names written inside it.
  std::string pattern;
};

/// Compares every output with every input and every other output by file
/// identity (device and inode after following symbolic links, stat(2); for a
/// path that does not exist yet, its folder's identity and its last name), not
/// by spelling. "-" (stdout) and empty paths are skipped. A clash prints a
/// message naming both ("--json x.settle is the design file x.settle") and
/// returns false (the command then exits 2 before anything runs).
bool check_paths(const std::vector<path_use>& uses);

}  // namespace settle::cli
