// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// hypre, as one or two independent copies in this process.
///
/// hypre keeps process-wide state (its error flag, its handle, its memory bookkeeping) and is
/// not thread-safe (hypre-space/hypre#775, #1301): two multigrid set-ups or V-cycles at once in
/// one copy corrupt each other. Copy 0 is the library voidsign links. Copy 1 is a private copy
/// of the same file, loaded from an in-memory duplicate with RTLD_LOCAL | RTLD_DEEPBIND, so that
/// its calls and its state stay its own: with it, the two models of a static run can each build
/// and apply their hierarchy at the same time, one per core. Its MPI (shared with copy 0) is used
/// on a communicator of its own. Every call sequence on a copy holds that copy's lock.
///
/// Internal to solver/la: only the iterative solver calls hypre.
#include <HYPRE.h>
#include <_hypre_parcsr_ls.h>  // the public API plus the rigid-body interpolation switches
#include <mpi.h>

#include <mutex>

namespace voidsign::solver {

#define VOIDSIGN_HYPRE_FUNCTIONS(X)                                                                      \
  X(HYPRE_Init) X(HYPRE_Finalize) X(HYPRE_GetError) X(HYPRE_ClearAllErrors) X(HYPRE_DescribeError)       \
  X(HYPRE_IJMatrixCreate) X(HYPRE_IJMatrixDestroy) X(HYPRE_IJMatrixSetObjectType)                       \
  X(HYPRE_IJMatrixSetDiagOffdSizes) X(HYPRE_IJMatrixInitialize) X(HYPRE_IJMatrixSetValues)              \
  X(HYPRE_IJMatrixAssemble) X(HYPRE_IJMatrixGetObject)                                                   \
  X(HYPRE_IJVectorCreate) X(HYPRE_IJVectorDestroy) X(HYPRE_IJVectorSetObjectType)                       \
  X(HYPRE_IJVectorInitialize) X(HYPRE_IJVectorAssemble) X(HYPRE_IJVectorGetObject)                      \
  X(HYPRE_BoomerAMGCreate) X(HYPRE_BoomerAMGDestroy) X(HYPRE_BoomerAMGSetup) X(HYPRE_BoomerAMGSolve)   \
  X(HYPRE_BoomerAMGSetPrintLevel) X(HYPRE_BoomerAMGSetMaxIter) X(HYPRE_BoomerAMGSetTol)                 \
  X(HYPRE_BoomerAMGSetCoarsenType) X(HYPRE_BoomerAMGSetInterpType) X(HYPRE_BoomerAMGSetPMaxElmts)       \
  X(HYPRE_BoomerAMGSetStrongThreshold) X(HYPRE_BoomerAMGSetAggNumLevels)                                \
  X(HYPRE_BoomerAMGSetCycleRelaxType) X(HYPRE_BoomerAMGSetRelaxType) X(HYPRE_BoomerAMGSetNumFunctions)  \
  X(HYPRE_BoomerAMGSetNodal) X(HYPRE_BoomerAMGSetNodalDiag) X(HYPRE_BoomerAMGSetInterpVecVariant)       \
  X(HYPRE_BoomerAMGSetInterpVecQMax) X(HYPRE_BoomerAMGSetSmoothInterpVectors)                          \
  X(HYPRE_BoomerAMGSetInterpRefine) X(HYPRE_BoomerAMGSetInterpVectors)

struct HypreLibrary {
#define VOIDSIGN_HYPRE_MEMBER(name) decltype(&::name) name = nullptr;
  VOIDSIGN_HYPRE_FUNCTIONS(VOIDSIGN_HYPRE_MEMBER)
#undef VOIDSIGN_HYPRE_MEMBER
  MPI_Comm comm = MPI_COMM_SELF;  ///< every object of this copy lives here
  std::mutex lock;
};

/// Copy 0 or 1, initialised (MPI started, HYPRE_Init called). Asking for copy 1 where it could
/// not be loaded, where MPI does not allow calls from several threads, or with
/// VOIDSIGN_ONE_HYPRE set, returns copy 0.
HypreLibrary& hypre_library(int copy);

/// Whether copy 1 is a copy of its own (loaded on first call).
bool hypre_has_private_copy();

}  // namespace voidsign::solver
