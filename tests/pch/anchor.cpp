// The translation unit that carries the tests' precompiled header (tests/pch/third_party.hpp).
