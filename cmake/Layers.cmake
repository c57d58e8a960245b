# The layering table: every library sub-folder, what it may include and link, in one place.
# The build reads it twice: liveprob_library() (cmake/LiveprobLibrary.cmake) links each target
# to exactly its row, and cmake/CheckLayers.cmake fails the build when a file includes a header
# its row does not allow (a header reachable only through another target's public links, or an
# outside library's header that happens to sit in /usr/include, would otherwise compile).
#
# Direction: tools -> replay-demo, adapters -> protocol -> engine. Inside replay-demo only
# `live` uses adapters. USES lists the project sub-folders whose headers a folder includes
# directly; LINKS the outside libraries its public headers include (linked PUBLIC);
# PRIVATE_LINKS those only its sources include. PURE marks the engine's rule: no I/O at all
# (no sockets, wire formats, logging, JSON, files or clocks).

# Outside libraries by the name rows use: the CMake target and the include paths that are its.
macro(liveprob_outside name target pattern)
  set(LIVEPROB_OUTSIDE_${name}_TARGET "${target}")
  set(LIVEPROB_OUTSIDE_${name}_PATTERN "${pattern}")
  list(APPEND LIVEPROB_OUTSIDE_NAMES ${name})
endmacro()
set(LIVEPROB_OUTSIDE_NAMES "")
liveprob_outside(eigen       Eigen3::Eigen            "^Eigen/")
liveprob_outside(flatbuffers flatbuffers::flatbuffers "^flatbuffers/")
liveprob_outside(wire        ""                       "^liveprob/wire/")  # protocol's generated code
liveprob_outside(simdjson    simdjson::simdjson       "^simdjson")
liveprob_outside(fmt         fmt::fmt                 "^fmt/")
liveprob_outside(spdlog      spdlog::spdlog           "^spdlog/")
liveprob_outside(zmq         cppzmq                   "^zmq([.]h|[.]hpp|_addon[.]hpp)$")
liveprob_outside(asio        Boost::boost             "^boost/asio")
liveprob_outside(beast       Boost::boost             "^boost/beast")
liveprob_outside(crc         Boost::boost             "^boost/crc[.]hpp$")
liveprob_outside(threads     Threads::Threads         "^(thread|mutex|shared_mutex|condition_variable|future)$")
liveprob_outside(cli11       CLI11::CLI11             "^CLI/")
liveprob_outside(nats        PkgConfig::NATS          "^nats/")
liveprob_outside(tools       ""                       "^(harness/|command_registry[.]hpp|progress_bar[.]hpp)")
# Header-only outside libraries: nothing of them is linked, so an installed static archive that
# uses them privately passes nothing on (cmake/LiveprobLibrary.cmake).
set(LIVEPROB_OUTSIDE_HEADER_ONLY eigen asio beast cli11)
# What PURE folders may not include beyond the libraries above: files, clocks, threads, streams.
set(LIVEPROB_IMPURE_PATTERN "^(fstream|filesystem|chrono|ctime|time[.]h|iostream|unistd[.]h|fcntl[.]h|sys/)")

macro(liveprob_layer job)
  cmake_parse_arguments(_layer "PURE" "FOLDER" "USES;LINKS;PRIVATE_LINKS" ${ARGN})
  list(APPEND LIVEPROB_LAYERS ${job})
  set(LIVEPROB_LAYER_${job}_FOLDER "${_layer_FOLDER}")
  set(LIVEPROB_LAYER_${job}_USES "${_layer_USES}")
  set(LIVEPROB_LAYER_${job}_LINKS "${_layer_LINKS}")
  set(LIVEPROB_LAYER_${job}_PRIVATE_LINKS "${_layer_PRIVATE_LINKS}")
  set(LIVEPROB_LAYER_${job}_PURE ${_layer_PURE})
endmacro()
set(LIVEPROB_LAYERS "")

#              job        folder                      may include (project)                              outside libraries
liveprob_layer(core       FOLDER engine/core          PURE                                               PRIVATE_LINKS eigen)
liveprob_layer(fit        FOLDER engine/fit           PURE USES core                                     PRIVATE_LINKS eigen)
liveprob_layer(capi       FOLDER engine/capi          PURE USES core)
liveprob_layer(protocol   FOLDER protocol             USES core                                          LINKS flatbuffers PRIVATE_LINKS wire simdjson fmt crc)
liveprob_layer(system     FOLDER adapters/system)
liveprob_layer(transport  FOLDER adapters/transport                                                      LINKS zmq asio PRIVATE_LINKS fmt spdlog)
liveprob_layer(monitoring FOLDER adapters/monitoring  USES protocol core                                 LINKS asio PRIVATE_LINKS beast fmt spdlog)
liveprob_layer(files      FOLDER adapters/files       USES protocol fit core                             PRIVATE_LINKS simdjson fmt)
liveprob_layer(datasets   FOLDER adapters/datasets    USES files protocol fit core                       PRIVATE_LINKS simdjson fmt)
liveprob_layer(service    FOLDER adapters/service     USES monitoring transport files system protocol core PRIVATE_LINKS zmq asio simdjson fmt spdlog threads)
liveprob_layer(clients    FOLDER adapters/clients     USES transport system protocol core                LINKS zmq PRIVATE_LINKS fmt threads)
liveprob_layer(cluster    FOLDER adapters/cluster     USES service system protocol core                  LINKS nats PRIVATE_LINKS fmt spdlog threads)
liveprob_layer(gateway    FOLDER adapters/gateway     USES cluster monitoring transport system protocol core PRIVATE_LINKS zmq asio beast simdjson fmt spdlog)
liveprob_layer(scoring    FOLDER replay-demo/scoring)
liveprob_layer(backtest   FOLDER replay-demo/backtest USES scoring protocol fit core                     PRIVATE_LINKS fmt threads)
liveprob_layer(report     FOLDER replay-demo/report   USES backtest scoring protocol fit                 PRIVATE_LINKS fmt)
liveprob_layer(demo       FOLDER replay-demo/demo     USES core)
liveprob_layer(live       FOLDER replay-demo/live     USES clients backtest scoring protocol core        PRIVATE_LINKS zmq fmt threads)
