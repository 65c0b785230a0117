// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/la/mpi_runtime.hpp"

#include <mpi.h>

#include <cstdlib>
#include <mutex>
#include <stdexcept>

namespace voidsign::solver {

namespace {

bool g_owns_mpi = false;
bool g_multiple = false;

void finalize_mpi() {
  int finalized = 0;
  MPI_Finalized(&finalized);
  if (g_owns_mpi && !finalized) MPI_Finalize();
}

}  // namespace

bool ensure_mpi() {
  static std::once_flag once;
  std::call_once(once, [] {
    int initialized = 0;
    MPI_Initialized(&initialized);
    int provided = MPI_THREAD_SINGLE;
    if (!initialized) {
      // Not started by a launcher: no helper daemon, no network transports. Only set when the
      // user has not chosen otherwise.
      if (!std::getenv("OMPI_COMM_WORLD_SIZE")) {
        setenv("OMPI_MCA_ess_singleton_isolated", "1", 0);
        setenv("OMPI_MCA_btl", "self", 0);
      }
      if (MPI_Init_thread(nullptr, nullptr, MPI_THREAD_MULTIPLE, &provided) != MPI_SUCCESS)
        throw std::runtime_error("MPI initialisation failed");
      g_owns_mpi = true;
      std::atexit(finalize_mpi);
    } else {
      MPI_Query_thread(&provided);
    }
    g_multiple = provided >= MPI_THREAD_MULTIPLE;
  });
  return g_multiple;
}

int mpi_comm_self_fortran() { return static_cast<int>(MPI_Comm_c2f(MPI_COMM_SELF)); }

}  // namespace voidsign::solver
