#include "app/cli/process_group.h"

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
    return std::make_unique<ProcessGroup>();
}

}  // namespace sw::cli
