# Writes OUT: a C++ source returning the contents of IN (the OpenAPI
# document) from openapi_document(). Run by server/api/CMakeLists.txt.
file(READ ${IN} PBFLEET_OPENAPI_TEXT)
string(FIND "${PBFLEET_OPENAPI_TEXT}" ")pbfleet_openapi\"" PBFLEET_DELIMITER_AT)
if(NOT PBFLEET_DELIMITER_AT EQUAL -1)
  message(FATAL_ERROR "openapi.json contains the raw-string delimiter")
endif()
file(WRITE ${OUT} "// Generated from server/api/openapi.json. Do not edit.\n"
  "#include \"server/api/openapi.hpp\"\n\n"
  "namespace pbfleet::api {\n\n"
  "std::string_view openapi_document() {\n"
  "  static constexpr std::string_view kDocument = R\"pbfleet_openapi(${PBFLEET_OPENAPI_TEXT})pbfleet_openapi\";\n"
  "  return kDocument;\n"
  "}\n\n"
  "}  // namespace pbfleet::api\n")
