# liveprob_library(<job>): the library of one sub-folder, as its row of cmake/Layers.cmake says.
# Target liveprob_<job> (alias liveprob::<job>), built from every src/*.cpp of the folder
# (globbed: re-run the configure step after adding a file), public headers under
# include/liveprob/<job>/, linked to the project targets of USES and the outside libraries of
# LINKS (public) and PRIVATE_LINKS, and to nothing else.
# SHARED makes a shared library for others to link: hidden visibility, and the project targets
# of USES linked privately (inside it, not passed on).
function(liveprob_library job)
  cmake_parse_arguments(_lib "SHARED" "" "" ${ARGN})
  if(NOT job IN_LIST LIVEPROB_LAYERS)
    message(FATAL_ERROR "liveprob_library(${job}): no row for '${job}' in cmake/Layers.cmake")
  endif()
  set(_target liveprob_${job})
  file(GLOB_RECURSE _src CONFIGURE_DEPENDS ${CMAKE_CURRENT_SOURCE_DIR}/src/*.cpp)
  set(_use_scope PUBLIC)
  if(_lib_SHARED)
    add_library(${_target} SHARED ${_src})
    set(_use_scope PRIVATE)
    set_target_properties(${_target} PROPERTIES C_VISIBILITY_PRESET hidden
      CXX_VISIBILITY_PRESET hidden VISIBILITY_INLINES_HIDDEN ON)
  else()
    add_library(${_target} ${_src})
  endif()
  add_library(liveprob::${job} ALIAS ${_target})
  target_include_directories(${_target} PUBLIC
    $<BUILD_INTERFACE:${CMAKE_CURRENT_SOURCE_DIR}/include>
    $<INSTALL_INTERFACE:${CMAKE_INSTALL_INCLUDEDIR}>)
  foreach(_use IN LISTS LIVEPROB_LAYER_${job}_USES)
    target_link_libraries(${_target} ${_use_scope} liveprob::${_use})
  endforeach()
  foreach(_scope PUBLIC PRIVATE)
    set(_names ${LIVEPROB_LAYER_${job}_LINKS})
    if(_scope STREQUAL "PRIVATE")
      set(_names ${LIVEPROB_LAYER_${job}_PRIVATE_LINKS})
    endif()
    foreach(_name IN LISTS _names)
      if(LIVEPROB_OUTSIDE_${_name}_TARGET)
        set(_link ${LIVEPROB_OUTSIDE_${_name}_TARGET})
        # A header-only library used by the sources alone is nothing to link for a user of the
        # installed archive: kept out of the exported interface (the installed CMake package
        # then needs no Eigen, Asio or CLI11 to be found).
        if(_scope STREQUAL "PRIVATE" AND _name IN_LIST LIVEPROB_OUTSIDE_HEADER_ONLY)
          set(_link $<BUILD_INTERFACE:${_link}>)
        endif()
        target_link_libraries(${_target} ${_scope} ${_link})
      endif()
    endforeach()
  endforeach()
  set_target_properties(${_target} PROPERTIES POSITION_INDEPENDENT_CODE ON EXPORT_NAME ${job})
  add_dependencies(${_target} liveprob_layering_check)
  liveprob_warnings(${_target})
  liveprob_sanitizer_optimisation(${_target} ${job})
  liveprob_fuzz_coverage(${_target} ${job})
endfunction()
