// The one main() of every doctest suite (see tamis_add_doctest_suite).
#define DOCTEST_CONFIG_IMPLEMENT_WITH_MAIN
#include <doctest/doctest.h>
