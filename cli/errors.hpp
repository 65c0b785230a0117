// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Error kinds of the program and the exit codes of the output contract.
#include <stdexcept>
#include <string>

namespace voidsign::cli {

/// Exit codes (outputs-v1): 0 ok, 2 bad input, 3 cannot solve, 4 cannot write.
enum ExitCode : int { exit_ok = 0, exit_bad_input = 2, exit_unsolvable = 3, exit_write = 4 };

/// Bad input: a scenario or command-line mistake. `what()` is the full one-line message, already
/// formatted as "FILE:LINE:COL: key 'a.b.c': problem (hint)".
struct InputError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

/// The model cannot be solved (singular, not converged, over the memory budget).
struct SolveError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

/// An output could not be written.
struct WriteError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

}  // namespace voidsign::cli
