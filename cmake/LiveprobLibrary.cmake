# liveprob_folder_library(NAME <target> DEPS <targets...>): one library per top-level folder,
# built from every src/*.cpp in it, public headers under include/.
function(liveprob_folder_library)
  cmake_parse_arguments(ARG "" "NAME;ALIAS" "DEPS;PRIVATE_DEPS" ${ARGN})
  file(GLOB_RECURSE _src CONFIGURE_DEPENDS ${CMAKE_CURRENT_SOURCE_DIR}/src/*.cpp)
  if(NOT _src)  # a folder with headers only (or none yet)
    add_library(${ARG_NAME} INTERFACE)
    target_include_directories(${ARG_NAME} INTERFACE $<BUILD_INTERFACE:${CMAKE_CURRENT_SOURCE_DIR}/include>)
    target_link_libraries(${ARG_NAME} INTERFACE ${ARG_DEPS})
    add_library(${ARG_ALIAS} ALIAS ${ARG_NAME})
    return()
  endif()
  add_library(${ARG_NAME} ${_src})
  add_library(${ARG_ALIAS} ALIAS ${ARG_NAME})
  target_include_directories(${ARG_NAME} PUBLIC
    $<BUILD_INTERFACE:${CMAKE_CURRENT_SOURCE_DIR}/include>
    $<INSTALL_INTERFACE:${CMAKE_INSTALL_INCLUDEDIR}>)
  target_link_libraries(${ARG_NAME} PUBLIC ${ARG_DEPS} PRIVATE ${ARG_PRIVATE_DEPS})
  set_target_properties(${ARG_NAME} PROPERTIES POSITION_INDEPENDENT_CODE ON)
  liveprob_warnings(${ARG_NAME})
endfunction()
