#!/usr/bin/env bash
# One entry point for developers and CI on Debian 12:
#   ./dev.sh demo    install what is missing, build, run the CLI on the demo data
#   ./dev.sh test    install what is missing, build and run every test suite
#                    (native; WebAssembly: the page tamis.html in Chromium and
#                    the engine under node; ASan/UBSan + fuzzers)
#   ./dev.sh build   install what is missing, native build only
#   ./dev.sh install install everything `test` needs, build nothing
# `./dev.sh test native|web|asan|fuzz ...` runs only the named test suites.
# Environment: TAMIS_JOBS (default 2), TAMIS_FUZZ_SECONDS (default 60, shared
# by all fuzzers), TAMIS_WASM_CACHE (see web/deps/build.sh).
set -euo pipefail

repo=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
cd "$repo"

jobs=${TAMIS_JOBS:-2}
fuzz_seconds=${TAMIS_FUZZ_SECONDS:-60}
export DEBIAN_FRONTEND=noninteractive
# Debian's emscripten needs node modules (acorn) from Debian's node tree, and
# runs much faster on the system Python than through a python3 shim on PATH.
export NODE_PATH=/usr/share/nodejs
export EMSDK_PYTHON=${EMSDK_PYTHON:-/usr/bin/python3}

# Enough to build the engine and the CLI and run the demo.
build_packages=(
  build-essential cmake ninja-build pkg-config
  libicu-dev libhowardhinnant-date-dev doctest-dev nlohmann-json3-dev
  libcli11-dev libxxhash-dev libfast-float-dev
  libsdl2-dev libimgui-dev libstb-dev fonts-dejavu-core
)
# Additionally needed by `test`: the WebAssembly toolchain and ICU tools for
# web/deps, clang for the sanitizer/fuzz build, Python and node for the
# reference tests, dpkg-dev for `apt-get source`.
# locales holds glibc's CP1252 charmap (encodings reference), bzip2 unpacks
# unicode-data's NormalizationTest.txt, python3-jsonschema checks recipes
# against the schema, time measures peak memory in the benchmarks.
# jellyfish and Levenshtein are the similar-values references, html5lib
# parses the HTML reports and headless chromium opens them; the SQL export
# runs on real PostgreSQL and MariaDB servers (started and stopped by the
# test) and on the sqlite3 shell.
test_packages=(
  icu-devtools emscripten clang-14 libclang-rt-14-dev
  python3 python3-numpy python3-pandas python3-jsonschema unicode-data bzip2 locales time dpkg-dev
  python3-jellyfish python3-levenshtein python3-html5lib chromium
  postgresql-15 mariadb-server python3-psycopg2 python3-pymysql sqlite3
  xvfb xauth libgl1-mesa-dri
)

started_at=$EPOCHREALTIME
current_phase=
phases_ran=false
failed_suites=()
# Test suites run in subshells, so their pass/fail counts go through a file:
# one "PASSED FAILED" line per ctest or fuzzer run.
test_counts=$(mktemp)

seconds_since() { awk -v a="$1" -v b="$EPOCHREALTIME" 'BEGIN { printf "%.1f", b - a }'; }

report_failed_phase() {
  local status=$1
  if [[ -n $current_phase ]]; then
    echo "dev.sh: phase '$current_phase' FAILED (exit status $status)" >&2
  fi
}

on_exit() {
  local status=$?
  report_failed_phase "$status"
  if $phases_ran; then
    echo "== total: $(seconds_since "$started_at") s"
  fi
  if [[ -s $test_counts ]]; then
    awk '{ passed += $1; failed += $2 } END { printf "tests: %d passed, %d failed\n", passed, failed }' "$test_counts"
  fi
  rm -f "$test_counts"
}
trap on_exit EXIT

# Runs one test suite (a function calling run_phase) with errexit in a
# subshell: a failure ends that suite, and the next suite still runs.
run_suite() {
  local suite=$1 status
  set +e
  (
    set -e
    trap 'report_failed_phase $?' EXIT
    "suite_$suite"
  )
  status=$?
  set -e
  if ((status != 0)); then
    failed_suites+=("$suite")
  fi
}

run_phase() {
  current_phase=$1
  phases_ran=true
  shift
  echo "== phase $current_phase"
  local phase_started_at=$EPOCHREALTIME
  "$@"
  echo "== phase $current_phase: $(seconds_since "$phase_started_at") s"
  current_phase=
}

as_root() {
  if [[ $(id -u) -eq 0 ]]; then
    "$@"
  else
    sudo "$@"
  fi
}

apt_get() {
  # Other apt users on the machine may hold the lock for a while.
  as_root apt-get -o DPkg::Lock::Timeout=600 -o Acquire::Retries=3 "$@"
}

is_installed() {
  [[ $(dpkg-query -W -f='${db:Status-Abbrev}' "$1" 2>/dev/null) == "ii " ]]
}

# apt-get source needs deb-src entries; add them next to Debian's own entries
# in a separate file so the system file stays untouched.
deb_src_file=/etc/apt/sources.list.d/tamis-deb-src.sources
deb_src_enabled() {
  grep -qsE '^Types:.*deb-src' /etc/apt/sources.list.d/*.sources ||
    grep -qsE '^deb-src ' /etc/apt/sources.list /etc/apt/sources.list.d/*.list
}

enable_deb_src() {
  local debian_sources=/etc/apt/sources.list.d/debian.sources
  if [[ -f $debian_sources ]]; then
    sed -E 's/^Types:.*/Types: deb-src/' "$debian_sources" | as_root tee "$deb_src_file" >/dev/null
  else
    grep -hE '^deb [^#]*debian' /etc/apt/sources.list |
      sed -E 's/^deb /deb-src /' | as_root tee /etc/apt/sources.list.d/tamis-deb-src.list >/dev/null
  fi
  echo "enabled deb-src entries for apt-get source"
}

install_debian_packages() {
  local wanted=("$@") missing=() package need_update=false
  for package in "${wanted[@]}"; do
    is_installed "$package" || missing+=("$package")
  done
  # A node from another origin (e.g. NodeSource, which bundles npm) must not be
  # replaced by Debian's, whose npm package conflicts with it.
  command -v node >/dev/null || missing+=(nodejs)
  command -v npm >/dev/null || missing+=(npm)

  if [[ $wanted_deb_src == true ]] && ! deb_src_enabled; then
    enable_deb_src
    need_update=true
  fi
  if ((${#missing[@]})); then
    echo "installing: ${missing[*]}"
    need_update=true
  fi
  if $need_update; then
    apt_get update -q
  fi
  if [[ $wanted_deb_src == true && $(apt-cache showsrc --only-source icu 2>/dev/null) != *Version:* ]]; then
    apt_get update -q
  fi
  if ((${#missing[@]})); then
    apt_get install -y -q --no-install-recommends "${missing[@]}"
  else
    echo "all ${#wanted[@]} Debian packages already installed"
  fi
}

# Every tests/**/package.json gets its node_modules; a stamp of the manifest
# and lock file skips the reinstall when nothing changed.
install_npm_packages() {
  local manifest dir stamp wanted_stamp
  while IFS= read -r manifest; do
    dir=$(dirname "$manifest")
    stamp=$dir/node_modules/.tamis-installed
    wanted_stamp=$(cat "$dir/package.json" "$dir/package-lock.json" 2>/dev/null | sha256sum | cut -d' ' -f1)
    if [[ -f $stamp && $(cat "$stamp") == "$wanted_stamp" ]]; then
      echo "npm packages in $dir are up to date"
      continue
    fi
    echo "npm install in $dir"
    # Test tools must never fetch a browser of their own (Debian's chromium is used).
    if [[ -f $dir/package-lock.json ]]; then
      (cd "$dir" && PUPPETEER_SKIP_DOWNLOAD=1 PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1 npm ci --no-audit --no-fund)
    else
      (cd "$dir" && PUPPETEER_SKIP_DOWNLOAD=1 PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1 npm install --no-audit --no-fund)
    fi
    echo "$wanted_stamp" >"$stamp"
  done < <(find tests -name node_modules -prune -o -name package.json -print | sort)
}

install_for_build() {
  wanted_deb_src=false
  install_debian_packages "${build_packages[@]}"
}

install_for_test() {
  wanted_deb_src=true
  install_debian_packages "${build_packages[@]}" "${test_packages[@]}"
  install_npm_packages
}

native_build() {
  cmake -S . -B build -G Ninja -DCMAKE_BUILD_TYPE=Release
  cmake --build build -j"$jobs"
}

# Runs ctest, keeps its summary line visible and adds its counts to the total.
run_ctest() {
  local build_dir=$1 log status=0 summary failed total
  shift
  log=$build_dir/ctest-output.log
  # The timeout only stops a hung test from eating CI's time; no test asserts on time.
  ctest --test-dir "$build_dir" --output-on-failure --no-tests=error --timeout 900 -j"$jobs" "$@" 2>&1 |
    tee "$log" || status=$?
  summary=$(grep -Eo '[0-9]+ tests failed out of [0-9]+' "$log" | tail -n1 || true)
  if [[ -n $summary ]]; then
    read -r failed _ _ _ _ total <<<"$summary"
    echo "$((total - failed)) $failed" >>"$test_counts"
  elif ((status != 0)); then
    echo "0 1" >>"$test_counts"
  fi
  if ((status != 0)); then
    echo "dev.sh: ctest in $build_dir failed" >&2
    return "$status"
  fi
}

wasm_prefix=
wasm_deps() {
  wasm_prefix=$(web/deps/build.sh)
  echo "WebAssembly dependencies: $wasm_prefix"
}

suite_native() {
  run_phase native-build native_build
  run_phase native-tests run_ctest build
}

suite_web() {
  run_phase web-deps wasm_deps
  run_phase web-build web_build
  run_phase web-tests run_ctest build-web
}

suite_asan() {
  run_phase asan-build asan_build
  run_phase asan-tests asan_tests
}

# Fuzzing still runs when a unit test failed; it needs the asan build, which
# the rebuild below confirms is complete.
suite_fuzz() {
  run_phase fuzz-build asan_build
  run_phase fuzz run_fuzzers
}

# The `web` preset (README): the page build/tamis.html plus the engine's unit
# tests under node. The browser tests compare the page's downloads with the
# native CLI, so the native suite runs first.
web_build() {
  cmake --preset web -DTAMIS_WASM_DEPS="$wasm_prefix" -DTAMIS_NATIVE_BUILD="$repo/build"
  cmake --build --preset web -j"$jobs"
  ls -l build-web/tamis.html
}

asan_build() {
  # The reference tests drive the release CLI; this build runs unit tests and fuzzers.
  # The desktop program is left out: this build checks the engine and the
  # workbench model (their unit suites and fuzzers); the window test runs on
  # Xvfb and Mesa, which are not instrumented.
  CC=clang-14 CXX=clang++-14 cmake -S . -B build-asan -G Ninja -DCMAKE_BUILD_TYPE=RelWithDebInfo \
    -DTAMIS_FUZZ=ON -DTAMIS_REFERENCE_TESTS=OFF -DTAMIS_DESK=OFF
  cmake --build build-asan -j"$jobs"
}

asan_tests() {
  ASAN_OPTIONS=${ASAN_OPTIONS:-detect_leaks=1} UBSAN_OPTIONS=${UBSAN_OPTIONS:-print_stacktrace=1} \
    run_ctest build-asan
}

# Each fuzzer gets an equal share of TAMIS_FUZZ_SECONDS; the corpus grows in
# the build directory between runs, seeds come from tests/fuzz/corpus/NAME.
# A fuzzer run counts as one test in the summary line.
run_fuzzers() {
  local fuzzers=() fuzzer name share corpus seeds corpus_dirs log status
  mapfile -t fuzzers < <(find build-asan/tests/fuzz -maxdepth 1 -type f -name 'fuzz_*' -perm -u+x 2>/dev/null | sort)
  if ((${#fuzzers[@]} == 0)); then
    echo "no fuzzers built"
    return
  fi
  share=$((fuzz_seconds / ${#fuzzers[@]}))
  ((share > 0)) || share=1
  for fuzzer in "${fuzzers[@]}"; do
    name=$(basename "$fuzzer")
    corpus=build-asan/fuzz-corpus/$name
    seeds=tests/fuzz/corpus/$name
    log=build-asan/fuzz-$name.log
    mkdir -p "$corpus" build-asan/fuzz-artifacts
    corpus_dirs=("$corpus")
    [[ -d $seeds ]] && corpus_dirs+=("$seeds")
    status=0
    "$fuzzer" -max_total_time="$share" -print_final_stats=1 \
      -artifact_prefix=build-asan/fuzz-artifacts/"$name"- "${corpus_dirs[@]}" >"$log" 2>&1 || status=$?
    if ((status != 0)); then
      echo "0 1" >>"$test_counts"
      tail -n 60 "$log" >&2
      echo "dev.sh: fuzzer $name failed (exit status $status); reproducer in build-asan/fuzz-artifacts/, log $log" >&2
      return "$status"
    fi
    echo "1 0" >>"$test_counts"
    echo "fuzz $name: ${share} s, $(grep -Eo 'stat::number_of_executed_units: [0-9]+' "$log" | grep -Eo '[0-9]+$' || echo '?') runs, no crash"
  done
}

# The main job: the demo recipe cleans the demo file; the input stays as it
# is, the cleaned file, the JSON report and the rejects go to build/demo/.
run_demo() {
  local demo=assets/demo out=build/demo
  mkdir -p "$out"
  build/native/cli/tamis run "$demo/tree_survey.recipe.json" "$demo/tree_survey.csv" \
    -o "$out/tree_survey.clean.csv" --report "$out/report.json" --rejects "$out/rejects.csv" \
    --metadata "$out/tree_survey.clean.csv-metadata.json"
  echo "cleaned file: $out/tree_survey.clean.csv; report: $out/report.json"
}

want_suite() {
  local suite=$1
  ((${#selected_suites[@]} == 0)) && return 0
  [[ " ${selected_suites[*]} " == *" $suite "* ]]
}

usage() {
  sed -n '2,10p' "${BASH_SOURCE[0]}" | sed 's/^# \{0,1\}//'
}

command=${1:-}
shift || true
case $command in
  demo)
    run_phase install install_for_build
    run_phase build native_build
    run_phase demo run_demo
    ;;
  build)
    run_phase install install_for_build
    run_phase build native_build
    ;;
  test)
    selected_suites=("$@")
    for suite in "${selected_suites[@]}"; do
      [[ $suite == native || $suite == web || $suite == asan || $suite == fuzz ]] || { usage >&2; exit 2; }
    done
    run_phase install install_for_test
    for suite in native web asan fuzz; do
      if want_suite "$suite"; then
        run_suite "$suite"
      fi
    done
    if ((${#failed_suites[@]})); then
      echo "dev.sh: FAILED suites: ${failed_suites[*]}" >&2
      exit 1
    fi
    ;;
  install)
    run_phase install install_for_test
    ;;
  -h | --help | help)
    usage
    ;;
  *)
    usage >&2
    exit 2
    ;;
esac
