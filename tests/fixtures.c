#include "fixtures.h"

#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <stdio.h>
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

const char *fixture_env(const char *name)
{
	const char *value = getenv(name);
	if (!value)
		fail_msg("%s is not set; run through 'meson test'", name);
	return value;
}

char *fixture_temporary_folder(const char *prefix)
{
	char *folder = malloc(512);
	assert_non_null(folder);
	snprintf(folder, 512, "%s/%s-XXXXXX", fixture_env("GP_TEST_TMP"),
		 prefix);
	assert_non_null(mkdtemp(folder));
	return folder;
}

void fixture_remove_tree(const char *path)
{
	char command[1200];
	snprintf(command, sizeof(command),
		 "chmod -R u+w '%s' 2>/dev/null; rm -rf '%s'", path, path);
	assert_int_equal(system(command), 0);
}
