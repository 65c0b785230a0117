// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/la/hypre_library.hpp"

#include <dlfcn.h>
#include <fcntl.h>
#include <link.h>
#include <sys/mman.h>
#include <unistd.h>

#include <cstdlib>
#include <cstring>
#include <string>

#include "solver/la/mpi_runtime.hpp"

namespace voidsign::solver {

namespace {

void bind_linked(HypreLibrary& lib) {
#define VOIDSIGN_HYPRE_LINKED(name) lib.name = &::name;
  VOIDSIGN_HYPRE_FUNCTIONS(VOIDSIGN_HYPRE_LINKED)
#undef VOIDSIGN_HYPRE_LINKED
}

/// All functions from `handle`, or false if one is missing.
bool bind_loaded(HypreLibrary& lib, void* handle) {
  bool complete = true;
#define VOIDSIGN_HYPRE_LOADED(name)                                          \
  lib.name = reinterpret_cast<decltype(&::name)>(dlsym(handle, #name)); \
  complete = complete && lib.name != nullptr;
  VOIDSIGN_HYPRE_FUNCTIONS(VOIDSIGN_HYPRE_LOADED)
#undef VOIDSIGN_HYPRE_LOADED
  return complete;
}

/// The file the linked hypre was loaded from, or "".
std::string linked_hypre_path() {
  std::string path;
  dl_iterate_phdr(
      [](dl_phdr_info* info, std::size_t, void* out) {
        const char* name = info->dlpi_name;
        if (name && std::strstr(name, "/libHYPRE")) {
          *static_cast<std::string*>(out) = name;
          return 1;
        }
        return 0;
      },
      &path);
  return path;
}

/// dlopen of a duplicate of `path` held in memory: the loader tells loaded objects apart by
/// file identity, so the duplicate is a second object with data of its own. DEEPBIND binds its
/// calls to itself first, not to the linked copy's same-named functions.
void* open_duplicate(const std::string& path) {
  const int src = open(path.c_str(), O_RDONLY | O_CLOEXEC);
  if (src < 0) return nullptr;
  const int dst = memfd_create("voidsign-hypre-copy", MFD_CLOEXEC);
  bool copied = dst >= 0;
  char buffer[1 << 16];
  while (copied) {
    const ssize_t got = read(src, buffer, sizeof buffer);
    if (got <= 0) {
      copied = got == 0;
      break;
    }
    for (ssize_t done = 0; copied && done < got;) {
      const ssize_t put = write(dst, buffer + done, static_cast<std::size_t>(got - done));
      copied = put > 0;
      done += put > 0 ? put : 0;
    }
  }
  close(src);
  void* handle = nullptr;
  if (copied) {
    const std::string fd_path = "/proc/self/fd/" + std::to_string(dst);
    handle = dlopen(fd_path.c_str(), RTLD_NOW | RTLD_LOCAL | RTLD_DEEPBIND);
  }
  if (dst >= 0) close(dst);  // the mapping outlives the descriptor
  return handle;
}

HypreLibrary linked_copy, private_copy;
bool private_loaded = false;

void finalize_all() {
  if (private_loaded) private_copy.HYPRE_Finalize();
  linked_copy.HYPRE_Finalize();
}

void initialise() {
  // Two copies calling into MPI from two threads need MPI_THREAD_MULTIPLE.
  const bool threads_allowed = ensure_mpi();
  bind_linked(linked_copy);
  linked_copy.HYPRE_Init();
  if (threads_allowed && !std::getenv("VOIDSIGN_ONE_HYPRE")) {
    const std::string path = linked_hypre_path();
    void* handle = path.empty() ? nullptr : open_duplicate(path);
    if (handle && bind_loaded(private_copy, handle) && private_copy.HYPRE_Init != linked_copy.HYPRE_Init) {
      MPI_Comm_dup(MPI_COMM_SELF, &private_copy.comm);
      private_copy.HYPRE_Init();
      private_loaded = true;
    } else if (handle) {
      dlclose(handle);
    }
  }
  std::atexit(finalize_all);
}

void ensure_initialised() {
  static std::once_flag once;
  std::call_once(once, initialise);
}

}  // namespace

HypreLibrary& hypre_library(int copy) {
  ensure_initialised();
  return copy == 1 && private_loaded ? private_copy : linked_copy;
}

bool hypre_has_private_copy() {
  ensure_initialised();
  return private_loaded;
}

}  // namespace voidsign::solver
