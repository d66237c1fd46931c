# Installs stepcert into a scratch prefix, then configures, builds and runs an outside
# consumer that uses find_package(stepcert CONFIG REQUIRED).
file(REMOVE_RECURSE ${WORK_DIR})
set(prefix ${WORK_DIR}/prefix)
function(step)
    execute_process(COMMAND ${ARGN} RESULT_VARIABLE rc OUTPUT_VARIABLE out ERROR_VARIABLE err)
    if(NOT rc EQUAL 0)
        message(FATAL_ERROR "step failed (${rc}): ${ARGN}\n${out}\n${err}")
    endif()
endfunction()
step(${CMAKE_COMMAND} -S ${SOURCE_DIR} -B ${WORK_DIR}/lib -DSTEPCERT_BUILD_TESTS=OFF
     -DSTEPCERT_BUILD_EXAMPLES=OFF -DSTEPCERT_BUILD_BENCHMARKS=OFF -DCMAKE_INSTALL_PREFIX=${prefix})
step(${CMAKE_COMMAND} --install ${WORK_DIR}/lib)
step(${CMAKE_COMMAND} -S ${SOURCE_DIR}/tests/consumer/project -B ${WORK_DIR}/app -DCMAKE_PREFIX_PATH=${prefix})
step(${CMAKE_COMMAND} --build ${WORK_DIR}/app)
step(${WORK_DIR}/app/consumer_app)
