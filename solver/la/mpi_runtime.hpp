// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The MPI runtime that hypre (BoomerAMG) and MUMPS are built on. voidsign runs as a single MPI
/// process (a "singleton", no launcher) unless started under one; every solver instance works on
/// MPI_COMM_SELF. MPI is started once, asking for MPI_THREAD_MULTIPLE so that one sparse solver
/// instance per OpenMP thread may run at the same time (the harmonic sweep's frequencies).
namespace voidsign::solver {

/// Starts MPI if nobody has (idempotent, thread-safe) and returns whether it grants
/// MPI_THREAD_MULTIPLE. Throws std::runtime_error when MPI cannot start.
bool ensure_mpi();

/// The Fortran handle of MPI_COMM_SELF (MUMPS's `comm_fortran`), after ensure_mpi.
int mpi_comm_self_fortran();

}  // namespace voidsign::solver
