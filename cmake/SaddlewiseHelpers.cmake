# sw_module(NAME DIR DEPS...): a static library of every .cpp in DIR (globbed, so a
# new file needs no CMake edit; re-run of cmake happens by itself via CONFIGURE_DEPENDS).
function(sw_module name dir)
  file(GLOB sources CONFIGURE_DEPENDS "${dir}/*.cpp")
  if(NOT sources)
    add_library(${name} INTERFACE)
    target_include_directories(${name} INTERFACE ${PROJECT_SOURCE_DIR})
    target_link_libraries(${name} INTERFACE ${ARGN})
    return()
  endif()
  add_library(${name} STATIC ${sources})
  target_include_directories(${name} PUBLIC ${PROJECT_SOURCE_DIR})
  target_link_libraries(${name} PUBLIC ${ARGN} PRIVATE sw_warnings)
endfunction()

# sw_gtest(NAME DIR DEPS...): one GoogleTest executable of every *_test.cpp in DIR,
# its tests discovered by ctest.
function(sw_gtest name dir)
  file(GLOB sources CONFIGURE_DEPENDS "${dir}/*.cpp")
  if(NOT sources)
    return()
  endif()
  add_executable(${name} ${sources})
  target_link_libraries(${name} PRIVATE ${ARGN} GTest::gtest GTest::gtest_main sw_warnings)
  target_compile_definitions(${name} PRIVATE
    SW_TEST_DATA_DIR="${PROJECT_SOURCE_DIR}/tests/data"
    SW_SOURCE_DIR="${PROJECT_SOURCE_DIR}"
    SW_BINARY_DIR="${PROJECT_BINARY_DIR}")
  gtest_discover_tests(${name} DISCOVERY_TIMEOUT 60 PROPERTIES LABELS "${name}")
endfunction()
