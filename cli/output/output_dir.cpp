// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/output/output_dir.hpp"

#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <exception>
#include <string>
#include <system_error>
#include <utility>

#include "cli/errors.hpp"

namespace fs = std::filesystem;

namespace voidsign::cli {
namespace {

std::string quoted(const fs::path& p) {
  std::string s = p.string();
  s.insert(s.begin(), '\'');  // not "'" + s: GCC 12 raises a false -Wrestrict on that
  s.push_back('\'');
  return s;
}

[[noreturn]] void write_failure(const fs::path& target, int err) {
  throw WriteError("cannot write " + quoted(target) + ": " + std::strerror(err));
}

/// The temporary name beside `target`: `<name>.tmp-<pid>`.
fs::path temp_name(const fs::path& target) {
  fs::path tmp = target;
  tmp += ".tmp-" + std::to_string(static_cast<long>(::getpid()));
  return tmp;
}

void remove_quietly(const fs::path& p) noexcept {
  std::error_code ec;
  fs::remove(p, ec);
}

void rename_or_throw(const fs::path& from, const fs::path& to) {
  std::error_code ec;
  fs::rename(from, to, ec);
  if (ec) {
    remove_quietly(from);
    throw WriteError("cannot write " + quoted(to) + ": " + ec.message());
  }
}

}  // namespace

void prepare_output_dir(const fs::path& dir, bool force) {
  if (dir.empty()) throw InputError("no output folder given");
  std::error_code ec;
  const fs::file_status st = fs::status(dir, ec);
  if (fs::exists(st)) {
    if (!fs::is_directory(st))
      throw InputError("output folder " + quoted(dir) + " exists and is not a folder");
    const bool empty = fs::is_empty(dir, ec);
    if (ec) throw WriteError("cannot read output folder " + quoted(dir) + ": " + ec.message());
    if (!empty && !force)
      throw InputError("output folder " + quoted(dir) +
                       " exists and is not empty; use --force to overwrite");
  } else {
    fs::create_directories(dir, ec);
    if (ec) throw WriteError("cannot create output folder " + quoted(dir) + ": " + ec.message());
  }
  // Fail now, not after a long solve, when the folder cannot take files.
  const fs::path probe = temp_name(dir / ".write-probe");
  std::FILE* f = std::fopen(probe.c_str(), "wb");
  if (!f) {
    const int err = errno;
    throw WriteError("cannot write in output folder " + quoted(dir) + ": " + std::strerror(err));
  }
  std::fclose(f);
  remove_quietly(probe);
}

AtomicFile::AtomicFile(fs::path target) : target_(std::move(target)), tmp_(temp_name(target_)) {
  file_ = std::fopen(tmp_.c_str(), "wb");
  if (!file_) write_failure(target_, errno);
}

AtomicFile::~AtomicFile() {
  if (file_) std::fclose(file_);
  if (!committed_) remove_quietly(tmp_);
}

void AtomicFile::write(std::string_view text) {
  if (!file_) throw WriteError("cannot write " + quoted(target_) + ": file already committed");
  if (text.empty()) return;
  if (std::fwrite(text.data(), 1, text.size(), file_) != text.size()) {
    const int err = errno;
    std::fclose(file_);
    file_ = nullptr;
    write_failure(target_, err);
  }
}

void AtomicFile::commit() {
  if (committed_) return;
  if (!file_) throw WriteError("cannot write " + quoted(target_) + ": file not open");
  std::FILE* f = std::exchange(file_, nullptr);
  errno = 0;
  int err = 0;
  if (std::fflush(f) != 0 || std::ferror(f)) err = errno != 0 ? errno : EIO;
  errno = 0;
  if (std::fclose(f) != 0 && err == 0) err = errno != 0 ? errno : EIO;
  if (err != 0) write_failure(target_, err);  // the destructor removes the temporary file
  rename_or_throw(tmp_, target_);
  committed_ = true;
}

void write_text_atomic(const fs::path& path, std::string_view text) {
  AtomicFile f(path);
  f.write(text);
  f.commit();
}

void write_atomic(const fs::path& path, const std::function<void(const fs::path& tmp)>& write_to) {
  const fs::path tmp = temp_name(path);
  try {
    write_to(tmp);
  } catch (const InputError&) {
    remove_quietly(tmp);
    throw;
  } catch (const SolveError&) {
    remove_quietly(tmp);
    throw;
  } catch (const WriteError&) {
    remove_quietly(tmp);
    throw;
  } catch (const std::exception& e) {
    remove_quietly(tmp);
    // Report the final name, not the temporary one, and say "cannot write" only once.
    std::string msg = e.what();
    const std::string t = tmp.string(), final_name = path.string();
    for (auto p = msg.find(t); p != std::string::npos; p = msg.find(t, p + final_name.size()))
      msg.replace(p, t.size(), final_name);
    const std::string lead = "cannot write " + quoted(path);
    if (msg.rfind(lead, 0) != 0) msg = lead + ": " + msg;
    throw WriteError(msg);
  } catch (...) {
    remove_quietly(tmp);
    throw;
  }
  std::error_code ec;
  if (!fs::is_regular_file(tmp, ec))
    throw WriteError("cannot write " + quoted(path) + ": the writer produced no file");
  rename_or_throw(tmp, path);
}

}  // namespace voidsign::cli
