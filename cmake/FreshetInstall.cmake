# Installation: cmake --install build --prefix P installs
#   P/bin/freshet, P/bin/freshet-bench            the executables
#   P/lib/libfreshet_<module>.a                   one static library per module
#   P/include/freshet/<module>/*.hpp              the public headers
#   P/lib/cmake/freshet/freshetConfig.cmake, freshetConfigVersion.cmake, freshetTargets*.cmake
# so that another project can call find_package(freshet CONFIG REQUIRED) and link
# freshet::<module> (tests/consumer is such a project; .ci/run builds it against P).
include(GNUInstallDirs)
include(CMakePackageConfigHelpers)

set(FRESHET_CMAKE_DIR ${CMAKE_INSTALL_LIBDIR}/cmake/freshet)

foreach(module IN LISTS FRESHET_MODULES)
  if(TARGET freshet_${module})
    install(TARGETS freshet_${module} EXPORT freshetTargets
            ARCHIVE DESTINATION ${CMAKE_INSTALL_LIBDIR}
            LIBRARY DESTINATION ${CMAKE_INSTALL_LIBDIR})
  endif()
endforeach()
install(TARGETS freshet RUNTIME DESTINATION ${CMAKE_INSTALL_BINDIR})
if(TARGET freshet-bench)
  install(TARGETS freshet-bench RUNTIME DESTINATION ${CMAKE_INSTALL_BINDIR})
endif()

install(DIRECTORY ${PROJECT_SOURCE_DIR}/include/freshet
        DESTINATION ${CMAKE_INSTALL_INCLUDEDIR}
        FILES_MATCHING PATTERN "*.hpp")

install(EXPORT freshetTargets NAMESPACE freshet:: DESTINATION ${FRESHET_CMAKE_DIR})
configure_package_config_file(${PROJECT_SOURCE_DIR}/cmake/freshetConfig.cmake.in
                              ${PROJECT_BINARY_DIR}/freshetConfig.cmake
                              INSTALL_DESTINATION ${FRESHET_CMAKE_DIR})
# 0.x: a consumer asking for 0.1 accepts 0.1.y only.
write_basic_package_version_file(${PROJECT_BINARY_DIR}/freshetConfigVersion.cmake
                                 VERSION ${PROJECT_VERSION} COMPATIBILITY SameMinorVersion)
install(FILES ${PROJECT_BINARY_DIR}/freshetConfig.cmake
              ${PROJECT_BINARY_DIR}/freshetConfigVersion.cmake
        DESTINATION ${FRESHET_CMAKE_DIR})
