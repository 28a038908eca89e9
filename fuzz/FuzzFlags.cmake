# Instrumentation for the fuzz build (-DUNCHAIN_BUILD_FUZZ=ON), included by
# the top-level CMakeLists.txt before any library is defined, so that every
# library is compiled with coverage feedback for libFuzzer and with
# AddressSanitizer (leaks included) and UndefinedBehaviorSanitizer. The
# fuzz target itself links the libFuzzer driver (fuzz/CMakeLists.txt).
# Use a build directory of its own (scripts/fuzz.sh uses build-fuzz/).
if(NOT CMAKE_CXX_COMPILER_ID MATCHES "Clang")
  message(FATAL_ERROR "UNCHAIN_BUILD_FUZZ needs clang (libFuzzer); configure with "
                      "-DCMAKE_CXX_COMPILER=clang++-14, found ${CMAKE_CXX_COMPILER_ID}")
endif()
# -O2 because a seed must solve within the 1 s timeout (the stack traces stay
# readable with -g). UB stops the run (no recover) so that libFuzzer records
# the input as a crash.
# EIGEN_NO_DEBUG: Eigen's index assertions live in out-of-line copies of
# operator[] that carry libFuzzer's comparison tracing, a quarter of the
# time of a batch-still seed; AddressSanitizer catches the same
# out-of-bounds accesses on the heap-allocated vectors anyway.
add_compile_options(-fsanitize=fuzzer-no-link,address,undefined -fno-sanitize-recover=undefined
                    -fno-omit-frame-pointer -O2 -g -DEIGEN_NO_DEBUG)
add_link_options(-fsanitize=address,undefined)
