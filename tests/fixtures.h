/* Fixtures shared by the cmocka test programs. */
#ifndef GP_TEST_FIXTURES_H
#define GP_TEST_FIXTURES_H

#include "diag.h"
#include "geos.h"
#include "test-files.h"

/* A diagnostics object and a GEOS context, made fresh for each test. */
struct fixture {
	struct gp_diag diag;
	struct gp_geos *geos;
};

/* cmocka setup and teardown: *state is a struct fixture. */
int setup(void **state);
int teardown(void **state);


#endif
