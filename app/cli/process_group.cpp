#include "app/cli/process_group.h"

#include "app/cli/cli.h"

#include <cstdlib>
#include <string>

namespace sw::cli {

namespace {
ProcessGroupFactory& factory() {
    static ProcessGroupFactory installed;
    return installed;
}
}  // namespace

void setProcessGroupFactory(ProcessGroupFactory f) { factory() = std::move(f); }

std::unique_ptr<ProcessGroup> joinProcessGroup() {
    if (factory())
        if (std::unique_ptr<ProcessGroup> group = factory()()) return group;
    // Started by an MPI launcher with several processes, but no MPI in this build: each process
    // would do the whole survey and print it. Refuse instead (OpenMPI, MPICH/PMI and PMIx name
    // the world size in the environment).
    if (!factory())
        for (const char* name : {"OMPI_COMM_WORLD_SIZE", "PMI_SIZE", "PMIX_SIZE", "MPI_LOCALNRANKS"})
            if (const char* value = std::getenv(name); value && std::atoi(value) > 1)
                throw UsageError(std::string("started by an MPI launcher with ") + value +
                                 " processes, but this saddlewise was built without MPI, so each would do the whole "
                                 "survey; run it as one process, or build with MPI (scripts/deps installs "
                                 "libopenmpi-dev)");
    return std::make_unique<ProcessGroup>();
}

}  // namespace sw::cli
