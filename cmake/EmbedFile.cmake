# unchain_embed_file(TARGET_SOURCE_VAR INPUT SYMBOL)
# Turns a data file into a C++ source that defines
#   std::string_view unchain::embedded::SYMBOL()
# so that the program carries its data and runs from any folder.
function(unchain_embed_file out_var input symbol)
  set(output "${CMAKE_CURRENT_BINARY_DIR}/embedded_${symbol}.cpp")
  add_custom_command(
    OUTPUT "${output}"
    COMMAND ${CMAKE_COMMAND} -DINPUT=${input} -DOUTPUT=${output} -DSYMBOL=${symbol}
            -P "${PROJECT_SOURCE_DIR}/cmake/EmbedFileScript.cmake"
    DEPENDS "${input}" "${PROJECT_SOURCE_DIR}/cmake/EmbedFileScript.cmake"
    COMMENT "Embedding ${input}"
    VERBATIM)
  set(${out_var} "${output}" PARENT_SCOPE)
endfunction()
