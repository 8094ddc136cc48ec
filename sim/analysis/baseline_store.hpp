// Updating a baseline file safely: a check before the search that it may be written, then a locked
// read-merge-rename.
#pragma once

#include <atomic>
#include <functional>
#include <string>

#include "sim/analysis/baseline.hpp"

namespace settle {

/// Why the baseline at `path` cannot be updated, or empty when it can: the
/// file (a symbolic link is followed) must be a regular file with a write
/// permission bit set that this process may write (access(2) W_OK and the
/// mode bits both, since root passes access() on a mode-0444 file), and its
/// folder must let a new file be created and renamed in the same way.
std::string baseline_unwritable(const std::string& path);

/// How an update ended.
enum class baseline_update_status {
  written,  ///< the merged file is in place
  stopped,  ///< `stop` was set before the rename: the file is as it was
  failed,   ///< an error (the message says which): the file is as it was
};

struct baseline_update_result {
  baseline_update_status status = baseline_update_status::failed;
  std::string error;    ///< when failed: what went wrong (without the path)
  std::string warning;  ///< when written: e.g. the old group could not be kept
};

/// Merges `entry` into the baseline at `path` (a symbolic link is followed):
/// takes an exclusive flock(2) on the file itself, re-reads it under the lock
/// and merges (the entry with the same design and stimulus is replaced,
/// every other kept), writes a temporary file in the same folder with the
/// old file's mode and group (and owner, when run as root), and renames it
/// into place. A process that waited for the lock and finds the file renamed
/// over meanwhile locks the new file instead. When no file exists yet, the
/// processes creating one serialise on `.NAME.lock` beside it, which the
/// creator removes once the file is in place. `on_wait` is called once when
/// the lock is held by another process. `stop` (may be null) is polled while
/// waiting and checked again just before the rename.
baseline_update_result update_baseline_file(const std::string& path, const baseline_entry& entry,
                                            const std::string& written_by,
                                            const std::atomic<bool>* stop,
                                            const std::function<void()>& on_wait = {});

}  // namespace settle
