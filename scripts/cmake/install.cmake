# Installing breathbeat like a tool: the program, its man page (made from its
# own --help by scripts/make-manpage, so no option is listed twice), bash
# completion (which also reads --help), the docs and the demo trial as an
# example; `cpack -G DEB` in the build folder makes a Debian package of the same.
include(GNUInstallDirs)
# Installing copies what `cmake --build` made; it does not rebuild every test first.
set(CMAKE_SKIP_INSTALL_ALL_DEPENDENCY TRUE)

set(BREATHBEAT_MANPAGE ${PROJECT_BINARY_DIR}/breathbeat.1)
add_custom_command(
  OUTPUT ${BREATHBEAT_MANPAGE}
  COMMAND ${BREATHBEAT_PYTHON3} ${PROJECT_SOURCE_DIR}/scripts/make-manpage $<TARGET_FILE:breathbeat>
          ${PROJECT_SOURCE_DIR}/docs/man/breathbeat.1.in ${BREATHBEAT_MANPAGE}
  DEPENDS breathbeat ${PROJECT_SOURCE_DIR}/scripts/make-manpage
          ${PROJECT_SOURCE_DIR}/docs/man/breathbeat.1.in
  COMMENT "Writing the man page from breathbeat --help"
  VERBATIM)
add_custom_target(breathbeat_manpage ALL DEPENDS ${BREATHBEAT_MANPAGE})

install(TARGETS breathbeat RUNTIME DESTINATION ${CMAKE_INSTALL_BINDIR})
install(FILES ${BREATHBEAT_MANPAGE} DESTINATION ${CMAKE_INSTALL_MANDIR}/man1)
install(FILES ${PROJECT_SOURCE_DIR}/scripts/completion/breathbeat.bash
        DESTINATION ${CMAKE_INSTALL_DATADIR}/bash-completion/completions RENAME breathbeat)
file(GLOB BREATHBEAT_DOCS CONFIGURE_DEPENDS ${PROJECT_SOURCE_DIR}/docs/*.md
     ${PROJECT_SOURCE_DIR}/docs/*.json)
install(FILES ${BREATHBEAT_DOCS} ${PROJECT_SOURCE_DIR}/README.md ${PROJECT_SOURCE_DIR}/LICENSE
        DESTINATION ${CMAKE_INSTALL_DOCDIR})
install(FILES ${PROJECT_SOURCE_DIR}/presets/demo/trial.toml
        DESTINATION ${CMAKE_INSTALL_DOCDIR}/examples RENAME demo-trial.toml)

set(CPACK_PACKAGE_NAME breathbeat)
set(CPACK_PACKAGE_VENDOR "breathbeat")
set(CPACK_PACKAGE_CONTACT "breathbeat maintainers <breathbeat@localhost>")
set(CPACK_PACKAGE_DESCRIPTION_SUMMARY
    "Heart-lung interactions at the bedside of a ventilated, hypotensive patient")
set(CPACK_RESOURCE_FILE_LICENSE ${PROJECT_SOURCE_DIR}/LICENSE)
set(CPACK_GENERATOR DEB)
set(CPACK_DEBIAN_FILE_NAME DEB-DEFAULT)
set(CPACK_DEBIAN_PACKAGE_SECTION science)
set(CPACK_DEBIAN_PACKAGE_SHLIBDEPS ON)  # the shared libraries it links (libedf1, libstdc++)
set(CPACK_STRIP_FILES ON)  # a package without debug symbols
set(CPACK_PACKAGE_DIRECTORY ${PROJECT_BINARY_DIR}/package)
include(CPack)

if(BREATHBEAT_BUILD_TESTS)
  # Installs into a temporary prefix and checks what a user gets; makes the .deb.
  add_test(NAME install.prefix_and_package
           COMMAND ${BREATHBEAT_PYTHON3} ${PROJECT_SOURCE_DIR}/tests/install/check_install.py
                   ${PROJECT_BINARY_DIR} $<TARGET_FILE:breathbeat>)
  set_tests_properties(install.prefix_and_package PROPERTIES LABELS install TIMEOUT 600)
endif()
