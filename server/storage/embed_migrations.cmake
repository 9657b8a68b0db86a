# Writes a C++ source holding every migration's number, name and SQL text.
# Called by a build rule with -DOUT=<file.cpp> -DFILES=<a;b;c> -DFUNCTION=<name>.
if(NOT FUNCTION)
  set(FUNCTION embedded_migrations)
endif()
set(body "")
foreach(file IN LISTS FILES)
  get_filename_component(name ${file} NAME)
  string(REGEX MATCH "^[0-9]+" number ${name})
  math(EXPR number "${number}")  # drop leading zeros
  file(READ ${file} sql)
  # A raw string with a delimiter no migration contains.
  string(FIND "${sql}" ")pbfleet_sql\"" clash)
  if(NOT clash EQUAL -1)
    message(FATAL_ERROR "${name} contains the raw-string delimiter")
  endif()
  string(APPEND body "    {${number}, \"${name}\", R\"pbfleet_sql(${sql})pbfleet_sql\"},\n")
endforeach()
file(WRITE ${OUT}.tmp
"// Generated from schema/*.sql by embed_migrations.cmake. Do not edit.
#include \"server/storage/migrations.hpp\"

namespace pbfleet::storage {

const std::vector<Migration>& ${FUNCTION}() {
  static const std::vector<Migration> migrations = {
${body}  };
  return migrations;
}

}  // namespace pbfleet::storage
")
file(COPY_FILE ${OUT}.tmp ${OUT} ONLY_IF_DIFFERENT)
