# Settings shared by the project's own tests, examples and benchmarks (not exported).
find_package(nlohmann_json 3 REQUIRED CONFIG)
find_package(Eigen3 3.3 REQUIRED CONFIG)
# Spectra (Debian libspectra-dev, headers on top of Eigen): the Arnoldi iteration of the
# matrix-free stability check (transport/extreme_eigenvalues.hpp, certify/).
find_package(Spectra 1.0 REQUIRED CONFIG)
find_package(benchmark REQUIRED)
find_package(GTest REQUIRED)
include(GoogleTest)
find_path(STEPCERT_MPFR_INCLUDE mpfr.h)
find_library(STEPCERT_MPFR_LIB mpfr)
find_library(STEPCERT_GMP_LIB gmp)

# stepcert_dev: warnings, sanitizers and the optional multiprecision back ends.
add_library(stepcert_dev INTERFACE)
# The project's own builds use float128 where the compiler has it (GCC), the cheap check type of
# reference solutions; with Clang (the sanitizer pass) the tests run without it.
target_link_libraries(stepcert_dev INTERFACE stepcert::stepcert nlohmann_json::nlohmann_json Eigen3::Eigen Spectra::Spectra)
if(TARGET stepcert::float128)
    target_link_libraries(stepcert_dev INTERFACE stepcert::float128)
endif()
target_compile_options(stepcert_dev INTERFACE -Wall -Wextra -Wpedantic
    $<$<BOOL:${STEPCERT_WARNINGS_AS_ERRORS}>:-Werror>)
if(STEPCERT_MPFR_INCLUDE AND STEPCERT_MPFR_LIB AND STEPCERT_GMP_LIB)
    target_compile_definitions(stepcert_dev INTERFACE STEPCERT_HAVE_MPFR=1)
    target_link_libraries(stepcert_dev INTERFACE ${STEPCERT_MPFR_LIB} ${STEPCERT_GMP_LIB})
endif()
if(STEPCERT_SANITIZE)
    target_compile_options(stepcert_dev INTERFACE -fsanitize=${STEPCERT_SANITIZE} -fno-omit-frame-pointer -fno-sanitize-recover=all)
    target_link_options(stepcert_dev INTERFACE -fsanitize=${STEPCERT_SANITIZE})
endif()
