# Third-party dependencies, all from Debian packages (or, for WebAssembly, built
# from Debian source packages by web/deps/build.sh into TAMIS_WASM_DEPS).
# Every dependency reaches our targets through one INTERFACE target, tamis_deps,
# and as SYSTEM includes so -Werror applies to our code only.
add_library(tamis_deps INTERFACE)

if(EMSCRIPTEN)
  if(NOT TAMIS_WASM_DEPS)
    # Built once from Debian source packages and cached outside the repository
    # (minutes the first time, instant afterwards).
    message(STATUS "Building or finding the WebAssembly dependencies (web/deps/build.sh)")
    execute_process(COMMAND "${CMAKE_SOURCE_DIR}/web/deps/build.sh"
                    OUTPUT_VARIABLE wasm_deps OUTPUT_STRIP_TRAILING_WHITESPACE RESULT_VARIABLE wasm_deps_status)
    if(NOT wasm_deps_status EQUAL 0)
      message(FATAL_ERROR "web/deps/build.sh failed (see its messages above)")
    endif()
    set(TAMIS_WASM_DEPS "${wasm_deps}" CACHE PATH "WebAssembly dependency prefix" FORCE)
  endif()
  if(NOT EXISTS "${TAMIS_WASM_DEPS}/lib/libicuuc.a")
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
  # ImGui and SDL2 for the browser page, built from Debian's source packages.
  add_library(tamis_imgui INTERFACE)
  target_include_directories(tamis_imgui SYSTEM INTERFACE
    "${TAMIS_WASM_DEPS}/include/imgui" "${TAMIS_WASM_DEPS}/include/imgui/backends" "${TAMIS_WASM_DEPS}/include/SDL2")
  target_link_libraries(tamis_imgui INTERFACE "${TAMIS_WASM_DEPS}/lib/libimgui.a" "${TAMIS_WASM_DEPS}/lib/libSDL2.a")
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
