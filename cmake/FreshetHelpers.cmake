# Shared build helpers: one line per library or test.
include(GNUInstallDirs)

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

# freshet_read_modules(<var>): the module chain from cmake/modules.txt, lowest first.
function(freshet_read_modules out)
  file(STRINGS ${PROJECT_SOURCE_DIR}/cmake/modules.txt lines)
  set(modules "")
  foreach(line IN LISTS lines)
    string(STRIP "${line}" line)
    if(line AND NOT line MATCHES "^#")
      list(APPEND modules ${line})
    endif()
  endforeach()
  set(${out} ${modules} PARENT_SCOPE)
endfunction()

# freshet_module_view(<module> <var>): sets <var> to an include folder in the build tree that
# holds freshet/<m> links to include/freshet/<m> for <module> and the modules below it in
# FRESHET_MODULES, and nothing else. A library compiled against its view cannot include a
# header of a module above its own: the compiler does not find it. The layering check
# (tests/layering) also finds such includes without building.
function(freshet_module_view module out)
  list(FIND FRESHET_MODULES ${module} rank)
  if(rank EQUAL -1)
    message(FATAL_ERROR "freshet: module '${module}' is not in cmake/modules.txt; add it there, "
                        "in its place in the chain (${FRESHET_MODULES})")
  endif()
  set(view ${PROJECT_BINARY_DIR}/include-views/${module})
  file(MAKE_DIRECTORY ${view}/freshet)
  file(GLOB old_links LIST_DIRECTORIES true ${view}/freshet/*)
  foreach(link IN LISTS old_links)
    if(IS_SYMLINK ${link})
      file(REMOVE ${link})  # removes the link only, never the headers it points to
    endif()
  endforeach()
  math(EXPR count "${rank} + 1")
  list(SUBLIST FRESHET_MODULES 0 ${count} visible)
  foreach(below IN LISTS visible)
    if(IS_DIRECTORY ${PROJECT_SOURCE_DIR}/include/freshet/${below})
      file(CREATE_LINK ${PROJECT_SOURCE_DIR}/include/freshet/${below} ${view}/freshet/${below}
           SYMBOLIC)
    endif()
  endforeach()
  set(${out} ${view} PARENT_SCOPE)
endfunction()

# add_freshet_library(<module> SOURCES a.cpp ... [DEPS freshet::x ...] [PRIVATE_DEPS ...])
# Builds static library freshet_<module> with alias freshet::<module>. <module> must be in
# cmake/modules.txt; in the build tree the library and its users see only the headers of
# <module> and the modules below it (freshet_module_view).
function(add_freshet_library module)
  cmake_parse_arguments(ARG "" "" "SOURCES;DEPS;PRIVATE_DEPS" ${ARGN})
  freshet_module_view(${module} view)
  add_library(freshet_${module} STATIC ${ARG_SOURCES})
  add_library(freshet::${module} ALIAS freshet_${module})
  set_target_properties(freshet_${module} PROPERTIES EXPORT_NAME ${module})
  target_include_directories(freshet_${module} PUBLIC $<BUILD_INTERFACE:${view}>
                                                      $<INSTALL_INTERFACE:${CMAKE_INSTALL_INCLUDEDIR}>)
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
