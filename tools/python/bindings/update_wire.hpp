// Adds the update readers (update_wire.cpp) to the compiled module.
#pragma once

#include <pybind11/pybind11.h>

namespace liveprob::python {
void add_update_wire(pybind11::module_& m);
}
