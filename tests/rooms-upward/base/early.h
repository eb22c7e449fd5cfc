/* Planted: base includes a header of the later room load/. */
#include "later.h"
