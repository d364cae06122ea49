# Third-party dependencies, all from Debian packages (or, for WebAssembly, built
# from Debian source packages by web/deps/build.sh into TAMIS_WASM_DEPS).
# Every dependency reaches our targets through one INTERFACE target, tamis_deps,
# and as SYSTEM includes so -Werror applies to our code only.
add_library(tamis_deps INTERFACE)

if(EMSCRIPTEN)
  if(NOT TAMIS_WASM_DEPS OR NOT EXISTS "${TAMIS_WASM_DEPS}/lib/libicuuc.a")
    message(FATAL_ERROR "TAMIS_WASM_DEPS must point at the output of web/deps/build.sh "
                        "(got '${TAMIS_WASM_DEPS}')")
  endif()
  target_include_directories(tamis_deps SYSTEM INTERFACE "${TAMIS_WASM_DEPS}/include")
  target_compile_definitions(tamis_deps INTERFACE U_STATIC_IMPLEMENTATION U_USING_ICU_NAMESPACE=0)
  target_link_libraries(tamis_deps INTERFACE
    "${TAMIS_WASM_DEPS}/lib/libicui18n.a"
    "${TAMIS_WASM_DEPS}/lib/libicuuc.a"
    "${TAMIS_WASM_DEPS}/lib/libicudata.a")
  set(TAMIS_DOCTEST_CMAKE "${TAMIS_WASM_DEPS}/cmake/doctest.cmake")
else()
  find_package(ICU REQUIRED COMPONENTS uc i18n data)
  find_package(date REQUIRED CONFIG)
  find_package(nlohmann_json REQUIRED CONFIG)
  find_package(PkgConfig REQUIRED)
  target_link_libraries(tamis_deps INTERFACE ICU::uc ICU::i18n ICU::data date::date nlohmann_json::nlohmann_json)
  target_compile_definitions(tamis_deps INTERFACE U_USING_ICU_NAMESPACE=0)
  find_package(doctest CONFIG)
  if(doctest_FOUND)
    set(TAMIS_DOCTEST_CMAKE "${doctest_DIR}/doctest.cmake")
  endif()
endif()
