// Fixture for the layering check (never compiled): nothing includes tools/.
#include "harness/child_process.hpp"
