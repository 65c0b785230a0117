// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Safe output handling: the output folder is checked before any work starts, and every file
/// appears under its final name only once it is complete (written beside it as
/// `<name>.tmp-<pid>`, then renamed). A run that fails or is killed therefore never leaves a
/// truncated result under a real name. This protects against the program failing, not against
/// power loss (no fsync).
#include <cstdio>
#include <filesystem>
#include <functional>
#include <string_view>

namespace voidsign::cli {

/// Makes `dir` ready to receive outputs, creating it (and its parents) when missing.
/// Throws InputError when `dir` exists but is not a folder, or is a non-empty folder and
/// `force` is false. With `force`, existing files stay; the outputs replace those of the same
/// name. Throws WriteError when the folder cannot be created.
void prepare_output_dir(const std::filesystem::path& dir, bool force);

/// A text file written under a temporary name and renamed to `target` by commit(). If the
/// object is destroyed without commit() (an error, an exception), the temporary file is removed
/// and `target` is left untouched. Every failure throws WriteError naming `target` and giving
/// the system's reason.
class AtomicFile {
 public:
  /// Opens `<target>.tmp-<pid>` in the folder of `target` for writing.
  explicit AtomicFile(std::filesystem::path target);
  ~AtomicFile();
  AtomicFile(const AtomicFile&) = delete;
  AtomicFile& operator=(const AtomicFile&) = delete;

  /// Appends `text`.
  void write(std::string_view text);
  /// Closes the temporary file and renames it to the target (replacing an existing file).
  void commit();

  /// The final name.
  const std::filesystem::path& target() const { return target_; }

 private:
  std::filesystem::path target_;
  std::filesystem::path tmp_;
  std::FILE* file_ = nullptr;
  bool committed_ = false;
};

/// Writes `text` to `path` through an AtomicFile.
void write_text_atomic(const std::filesystem::path& path, std::string_view text);

/// For writers that need a file name (VTK): calls `write_to(tmp)` with a temporary name beside
/// `path`, then renames it to `path`. If `write_to` throws, or leaves no file, the temporary file
/// is removed and WriteError is thrown naming `path` (InputError, SolveError and WriteError from
/// `write_to` pass through unchanged).
void write_atomic(const std::filesystem::path& path,
                  const std::function<void(const std::filesystem::path& tmp)>& write_to);

}  // namespace voidsign::cli
