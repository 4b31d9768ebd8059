#pragma once
// The processes that share one survey. Normally just this process; when the program was
// started by an MPI launcher (mpirun, srun) and built with MPI, the ranks of MPI_COMM_WORLD.
// The survey verbs split their independent pieces (starts, grid cells) over the group, gather
// the pieces' results on rank 0 in index order, and only rank 0 writes anything, so the
// result is the single-process one (app/mpi/ has the MPI implementation; core/ knows nothing
// of it).
//
// MPI is started only by joinProcessGroup(), which only the survey verbs call, and only when a
// launcher's variables are in the environment (OMPI_COMM_WORLD_SIZE, PMIX_RANK, PMI_SIZE):
// the window and every other verb never touch MPI, and a plain `saddlewise critical ...` does
// not pay OpenMPI's singleton start-up (seconds on machines without a network).

#include <functional>
#include <memory>
#include <vector>

namespace sw::cli {

class ProcessGroup {
public:
    virtual ~ProcessGroup() = default;
    virtual int rank() const { return 0; }
    virtual int size() const { return 1; }
    // Every process's `mine` concatenated in rank order on rank 0; an empty vector elsewhere.
    // Collective: every process of the group must call it, in the same order.
    virtual std::vector<double> gather(const std::vector<double>& mine) { return mine; }
    // The same concatenation on every process (for what every process needs next).
    virtual std::vector<double> gatherAll(const std::vector<double>& mine) { return mine; }
    // How many threads this process should use when the user did not say: the hardware's
    // threads shared among the group's processes on this node (0: all of them).
    virtual int defaultThreads() const { return 0; }
    // A line for the text output, e.g. "4 MPI processes"; empty for a single process.
    virtual const char* description() const { return ""; }
};

// What joinProcessGroup() asks first; main() installs the MPI one when the program was built
// with MPI. The factory returns nullptr when the process was not started by a launcher.
using ProcessGroupFactory = std::function<std::unique_ptr<ProcessGroup>()>;
void setProcessGroupFactory(ProcessGroupFactory factory);
// The group this process belongs to (a single-process group without a factory or launcher).
// The group ends (MPI_Finalize) when the returned object is destroyed.
std::unique_ptr<ProcessGroup> joinProcessGroup();

// Pieces [0, count) dealt round-robin: rank r takes r, r + K, r + 2K, ... (neighbouring grid
// cells cost alike, so every process gets a fair share of the slow basin boundaries).
inline long piecesOf(long count, int rank, int size) { return count > rank ? (count - rank + size - 1) / size : 0; }
inline long pieceIndex(long local, int rank, int size) { return rank + local * size; }

}  // namespace sw::cli
