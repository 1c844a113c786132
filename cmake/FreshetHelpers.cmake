# Shared build helpers: one line per library or test.

function(freshet_warnings target)
  # -Wno-restrict: g++ 12 reports false -Wrestrict errors inside std::string operator+ at -O2
  # (GCC bug 105651, fixed in g++ 13).
  target_compile_options(${target} PRIVATE -Wall -Wextra -Wpedantic -Wshadow -Wconversion
                                           -Wno-sign-conversion)
  if(CMAKE_CXX_COMPILER_ID STREQUAL "GNU")
    target_compile_options(${target} PRIVATE -Wno-restrict)
  endif()
  if(FRESHET_WERROR)
    target_compile_options(${target} PRIVATE -Werror)
  endif()
endfunction()

# add_freshet_library(<module> SOURCES a.cpp ... [DEPS freshet::x ...] [PRIVATE_DEPS ...])
# Builds static library freshet_<module> with alias freshet::<module>.
function(add_freshet_library module)
  cmake_parse_arguments(ARG "" "" "SOURCES;DEPS;PRIVATE_DEPS" ${ARGN})
  add_library(freshet_${module} STATIC ${ARG_SOURCES})
  add_library(freshet::${module} ALIAS freshet_${module})
  target_include_directories(freshet_${module} PUBLIC ${PROJECT_SOURCE_DIR}/include)
  target_compile_features(freshet_${module} PUBLIC cxx_std_20)
  target_link_libraries(freshet_${module} PUBLIC ${ARG_DEPS} PRIVATE ${ARG_PRIVATE_DEPS})
  freshet_warnings(freshet_${module})
endfunction()

# add_freshet_test(<name> SOURCES a_test.cpp ... DEPS freshet::x ...)
# One GoogleTest executable; every TEST becomes its own CTest entry.
function(add_freshet_test name)
  cmake_parse_arguments(ARG "" "" "SOURCES;DEPS" ${ARGN})
  add_executable(${name} ${ARG_SOURCES})
  target_link_libraries(${name} PRIVATE ${ARG_DEPS} GTest::gtest_main GTest::gmock)
  target_compile_definitions(${name} PRIVATE
      FRESHET_SOURCE_DIR="${PROJECT_SOURCE_DIR}")
  freshet_warnings(${name})
  gtest_discover_tests(${name} DISCOVERY_TIMEOUT 60 PROPERTIES TIMEOUT 300)
endfunction()
