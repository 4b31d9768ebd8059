#pragma once
// The MPI process group (see app/cli/process_group.h). Built only when CMake finds MPI.
#include "app/cli/process_group.h"

namespace sw::mpi {

// nullptr unless the process was started by an MPI launcher; otherwise MPI_Init_thread
// (funneled: only the main thread calls MPI; worker threads only compute) and a group over
// MPI_COMM_WORLD whose destructor calls MPI_Finalize. MPI can start once per process: a second
// call after the first group ended gives nullptr.
std::unique_ptr<cli::ProcessGroup> joinWorld();

}  // namespace sw::mpi
