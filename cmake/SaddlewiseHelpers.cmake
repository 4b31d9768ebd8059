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
  # One precompiled header per kind of target, not one per target: each Qt header image is
  # about 400 MB, and 42 of them filled 10 GB of a CI disk. The first target of a kind builds
  # it and the others reuse it (REUSE_FROM). GCC takes a header only when the code-generation
  # flags match, so the key also holds the target type (libraries -fPIC, executables -fPIE)
  # and whether Qt is linked directly (Qt turns position-independent code on); with
  # -Winvalid-pch and -Werror a mismatch would fail the build rather than go unnoticed.
  get_target_property(type ${target} TYPE)
  get_target_property(links ${target} LINK_LIBRARIES)
  set(with_qt "")
  if(links MATCHES "Qt6::|sw_window|sw_widgets|sw_report_gui")
    set(with_qt "_qt")
  endif()
  set(key "SW_PCH_${kind}_${type}${with_qt}")
  get_property(host GLOBAL PROPERTY ${key})
  if(host)
    target_precompile_headers(${target} REUSE_FROM ${host})
  else()
    set_property(GLOBAL PROPERTY ${key} ${target})
    target_precompile_headers(${target} PRIVATE ${headers})
  endif()
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
