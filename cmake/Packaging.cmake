# What `cmake --install` leaves in a prefix, for programs that embed the engine:
#   lib/libliveprob.so.2        the shared C library (liveprob::c; pkg-config: liveprob)
#   lib/libliveprob_{core,fit,protocol}.a, include/liveprob/...   the C++ engine and codecs
#   lib/cmake/liveprob/         find_package(liveprob [COMPONENTS c engine protocol])
#   lib/pkgconfig/liveprob.pc   the C library for Makefiles
#   bin/liveprob, share/liveprob/{web,schemas}   the program, the gateway's page, the schemas
# tests/packaging installs into a scratch prefix and builds consumer projects against it.
include(CMakePackageConfigHelpers)
set(LIVEPROB_CMAKE_DIR ${CMAKE_INSTALL_LIBDIR}/cmake/liveprob)
foreach(_set C Engine Protocol)
  install(EXPORT liveprob${_set}Targets NAMESPACE liveprob:: DESTINATION ${LIVEPROB_CMAKE_DIR}
    COMPONENT development)
endforeach()
configure_package_config_file(cmake/liveprobConfig.cmake.in
  ${CMAKE_CURRENT_BINARY_DIR}/liveprobConfig.cmake INSTALL_DESTINATION ${LIVEPROB_CMAKE_DIR})
write_basic_package_version_file(${CMAKE_CURRENT_BINARY_DIR}/liveprobConfigVersion.cmake
  COMPATIBILITY SameMinorVersion)
install(FILES ${CMAKE_CURRENT_BINARY_DIR}/liveprobConfig.cmake
  ${CMAKE_CURRENT_BINARY_DIR}/liveprobConfigVersion.cmake DESTINATION ${LIVEPROB_CMAKE_DIR}
  COMPONENT development)

# pkg-config: the C library. Paths relative to the .pc file's own place, so the prefix can move.
file(RELATIVE_PATH _pc_to_prefix "/${CMAKE_INSTALL_LIBDIR}/pkgconfig" "/")
string(REGEX REPLACE "/$" "" _pc_to_prefix "${_pc_to_prefix}")
set(LIVEPROB_PC_PREFIX "\${pcfiledir}/${_pc_to_prefix}")
configure_file(cmake/liveprob.pc.in ${CMAKE_CURRENT_BINARY_DIR}/liveprob.pc @ONLY)
install(FILES ${CMAKE_CURRENT_BINARY_DIR}/liveprob.pc
  DESTINATION ${CMAKE_INSTALL_LIBDIR}/pkgconfig COMPONENT development)

# systemd units for serve and gateway (tools/packaging/): installed, never enabled.
install(FILES ${PROJECT_SOURCE_DIR}/tools/packaging/liveprob-serve.service
  ${PROJECT_SOURCE_DIR}/tools/packaging/liveprob-gateway.service
  DESTINATION lib/systemd/system COMPONENT runtime)

# The Debian package (`cpack -G DEB` in a build folder): liveprob_<version>_amd64.deb with
# everything above under /usr; its Depends come from dpkg-shlibdeps (the shared libraries the
# program and libliveprob link), its shlibs file and ldconfig trigger from CPack.
# tools/setup/check-deb builds, installs, runs and removes it (run-tests --deep).
set(CPACK_GENERATOR DEB)
set(CPACK_PACKAGE_NAME liveprob)
set(CPACK_PACKAGE_VERSION ${PROJECT_VERSION})
set(CPACK_PACKAGE_DESCRIPTION_SUMMARY
  "live football win/draw/loss probabilities: program, C library, C++ engine")
set(CPACK_PACKAGE_CONTACT "liveprob developers <liveprob-developers@localhost>")
set(CPACK_PACKAGING_INSTALL_PREFIX /usr)
set(CPACK_DEBIAN_FILE_NAME DEB-DEFAULT)
set(CPACK_DEBIAN_PACKAGE_SECTION science)
set(CPACK_DEBIAN_PACKAGE_SHLIBDEPS ON)
set(CPACK_DEBIAN_PACKAGE_GENERATE_SHLIBS ON)
set(CPACK_DEBIAN_PACKAGE_DESCRIPTION "Turns a live football match (pre-match prior, goals, red cards, clock) into live home/draw/away probabilities, final-score distributions and next-goal odds.\n The program `liveprob` (live service, gateway, replay and backtests), the shared C library libliveprob, the C++ engine and wire codecs with their CMake package and pkg-config file, and systemd units for serve and gateway (not enabled). Outputs are model estimates, not advice.")
set(CPACK_STRIP_FILES ON)
include(CPack)
