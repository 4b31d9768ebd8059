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
  if(name STREQUAL "sw_expr")
    sw_precompile(${name} std)
  else()
    sw_precompile(${name} core)
  endif()
endfunction()

# sw_precompile(TARGET KIND): with SADDLEWISE_PCH, precompile the third-party headers that
# dominate compile time. KIND: std (the standard library only), core (+ Eigen),
# test (+ GoogleTest), qt (+ Qt Widgets and QCustomPlot).
function(sw_precompile target kind)
  if(NOT SADDLEWISE_PCH)
    return()
  endif()
  set(headers <algorithm> <cmath> <functional> <map> <memory> <string> <vector>)
  if(NOT kind STREQUAL "std")
    list(APPEND headers <Eigen/Dense>)
  endif()
  if(kind STREQUAL "test")
    list(APPEND headers <gtest/gtest.h>)
  elseif(kind STREQUAL "qt")
    list(APPEND headers <QtWidgets> <qcustomplot.h>)
  endif()
  target_precompile_headers(${target} PRIVATE ${headers})
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
  sw_precompile(${name} test)
  target_compile_definitions(${name} PRIVATE
    SW_TEST_DATA_DIR="${PROJECT_SOURCE_DIR}/tests/data"
    SW_SOURCE_DIR="${PROJECT_SOURCE_DIR}"
    SW_BINARY_DIR="${PROJECT_BINARY_DIR}")
  gtest_discover_tests(${name} DISCOVERY_TIMEOUT 60 PROPERTIES LABELS "${name}")
endfunction()
