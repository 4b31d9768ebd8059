#include "app/mpi/mpi_process_group.h"

#include <mpi.h>

#include <algorithm>
#include <cstdlib>
#include <limits>
#include <stdexcept>
#include <string>
#include <thread>

namespace sw::mpi {

namespace {

bool startedByLauncher() {
    for (const char* variable : {"OMPI_COMM_WORLD_SIZE", "PMIX_RANK", "PMI_SIZE", "PMI_RANK"})
        if (std::getenv(variable)) return true;
    return false;
}

// Processes of this job on this node, from the launcher's variables (1 when not given).
int processesOnThisNode() {
    for (const char* variable : {"OMPI_COMM_WORLD_LOCAL_SIZE", "MPI_LOCALNRANKS", "SLURM_NTASKS_PER_NODE"})
        if (const char* value = std::getenv(variable)) {
            const int n = std::atoi(value);
            if (n > 0) return n;
        }
    return 1;
}

class WorldGroup final : public cli::ProcessGroup {
public:
    WorldGroup() {
        int provided = 0;
        MPI_Init_thread(nullptr, nullptr, MPI_THREAD_FUNNELED, &provided);
        MPI_Comm_rank(MPI_COMM_WORLD, &rank_);
        MPI_Comm_size(MPI_COMM_WORLD, &size_);
        description_ = std::to_string(size_) + (size_ == 1 ? " MPI process" : " MPI processes");
    }
    ~WorldGroup() override { MPI_Finalize(); }
    WorldGroup(const WorldGroup&) = delete;
    WorldGroup& operator=(const WorldGroup&) = delete;

    int rank() const override { return rank_; }
    int size() const override { return size_; }
    const char* description() const override { return description_.c_str(); }
    int defaultThreads() const override {
        const int hardware = static_cast<int>(std::thread::hardware_concurrency());
        return std::max(1, hardware / processesOnThisNode());
    }

    std::vector<double> gather(const std::vector<double>& mine) override { return collect(mine, false); }
    std::vector<double> gatherAll(const std::vector<double>& mine) override { return collect(mine, true); }

private:
    std::vector<double> collect(const std::vector<double>& mine, bool everyone) {
        if (mine.size() > static_cast<std::size_t>(std::numeric_limits<int>::max()))
            throw std::runtime_error("a process's share is too large for one MPI message");
        const int count = static_cast<int>(mine.size());
        std::vector<int> counts(rank_ == 0 || everyone ? static_cast<std::size_t>(size_) : 0);
        if (everyone)
            MPI_Allgather(&count, 1, MPI_INT, counts.data(), 1, MPI_INT, MPI_COMM_WORLD);
        else
            MPI_Gather(&count, 1, MPI_INT, counts.data(), 1, MPI_INT, 0, MPI_COMM_WORLD);
        std::vector<int> offsets(counts.size());
        long long total = 0;
        for (std::size_t r = 0; r < counts.size(); ++r) {
            if (total > std::numeric_limits<int>::max())
                throw std::runtime_error("the gathered survey is too large for one MPI message");
            offsets[r] = static_cast<int>(total);
            total += counts[r];
        }
        std::vector<double> all(static_cast<std::size_t>(total));
        if (everyone)
            MPI_Allgatherv(mine.data(), count, MPI_DOUBLE, all.data(), counts.data(), offsets.data(), MPI_DOUBLE,
                           MPI_COMM_WORLD);
        else
            MPI_Gatherv(mine.data(), count, MPI_DOUBLE, all.data(), counts.data(), offsets.data(), MPI_DOUBLE, 0,
                        MPI_COMM_WORLD);
        return all;
    }

    int rank_ = 0, size_ = 1;
    std::string description_;
};

}  // namespace

std::unique_ptr<cli::ProcessGroup> joinWorld() {
    if (!startedByLauncher()) return nullptr;
    int finalized = 0;
    MPI_Finalized(&finalized);
    int initialized = 0;
    MPI_Initialized(&initialized);
    if (finalized || initialized) return nullptr;
    return std::make_unique<WorldGroup>();
}

}  // namespace sw::mpi
