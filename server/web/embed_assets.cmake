# Writes OUT: a C++ source holding every file named in FILES (a ;-list of
# paths under DIR) as bytes, with its content type and an ETag made from
# its SHA-256. Run by server/web/CMakeLists.txt whenever an asset changes.
set(entries "")
set(arrays "")
set(index 0)
foreach(rel IN LISTS FILES)
  set(path ${DIR}/${rel})
  file(READ ${path} hex HEX)
  string(REGEX REPLACE "([0-9a-f][0-9a-f])" "0x\\1," bytes "${hex}")
  file(SHA256 ${path} digest)
  string(SUBSTRING ${digest} 0 20 etag)
  get_filename_component(ext ${rel} LAST_EXT)
  if(ext STREQUAL ".css")
    set(type "text/css; charset=utf-8")
  elseif(ext STREQUAL ".js")
    set(type "text/javascript; charset=utf-8")
  elseif(ext STREQUAL ".svg")
    set(type "image/svg+xml")
  elseif(ext STREQUAL ".png")
    set(type "image/png")
  else()
    message(FATAL_ERROR "no content type known for asset ${rel}")
  endif()
  string(APPEND arrays "constexpr unsigned char kAsset${index}[] = {${bytes}};\n")
  string(APPEND entries
    "    {\"/assets/${rel}\", \"${type}\", \"\\\"${etag}\\\"\",\n"
    "     {reinterpret_cast<const char*>(kAsset${index}), sizeof kAsset${index}}},\n")
  math(EXPR index "${index} + 1")
endforeach()
file(WRITE ${OUT}.tmp "// Generated from server/web/assets by embed_assets.cmake. Do not edit.\n"
  "#include \"server/web/assets.hpp\"\n\n"
  "namespace pbfleet::web {\nnamespace {\n\n${arrays}\n"
  "const Asset kAssets[] = {\n${entries}};\n\n}  // namespace\n\n"
  "std::span<const Asset> embedded_assets() { return kAssets; }\n\n"
  "}  // namespace pbfleet::web\n")
file(COPY_FILE ${OUT}.tmp ${OUT} ONLY_IF_DIFFERENT)
file(REMOVE ${OUT}.tmp)
