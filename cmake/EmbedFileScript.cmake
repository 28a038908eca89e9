# Script mode: writes OUTPUT as a C++ source holding INPUT's bytes.
file(READ "${INPUT}" hex HEX)
string(LENGTH "${hex}" hex_length)
string(REGEX REPLACE "([0-9a-f][0-9a-f])" "0x\\1," bytes "${hex}")
math(EXPR byte_count "${hex_length} / 2")
get_filename_component(input_name "${INPUT}" NAME)
file(WRITE "${OUTPUT}.tmp"
"// Generated from data/${input_name}; do not edit.\n#include <string_view>\nnamespace unchain::embedded {\nnamespace {\nconstexpr unsigned char data[] = {${bytes} 0};\n}\nstd::string_view ${SYMBOL}() { return {reinterpret_cast<const char*>(data), ${byte_count}}; }\n}\n")
file(RENAME "${OUTPUT}.tmp" "${OUTPUT}")
