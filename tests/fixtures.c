#include "fixtures.h"

#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <stdlib.h>

int setup(void **state)
{
	struct fixture *f = calloc(1, sizeof(*f));
	assert_non_null(f);
	gp_diag_init(&f->diag);
	f->geos = gp_geos_create(&f->diag);
	assert_non_null(f->geos);
	*state = f;
	return 0;
}

int teardown(void **state)
{
	struct fixture *f = *state;
	gp_geos_destroy(f->geos);
	gp_diag_finish(&f->diag);
	free(f);
	return 0;
}
