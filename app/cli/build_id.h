#pragma once
// What was built: the version (CMake's project version) and the build id, the git commit the
// build was made from ("git 1d77abe0c3f2", "-modified" appended when tracked files differed),
// or "unknown" outside a git checkout. Generated at build time by cmake/build_id.cmake.

namespace sw::cli {

const char* version();
const char* buildId();

}  // namespace sw::cli
