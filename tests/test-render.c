/* The outputs in memory (gp_build_render, glassplot.h) are the files
 * gp_build_write puts on disk, byte for byte and name for name; the
 * accessors that take a const build give the same text on every call. */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include "glassplot.h"
#include "test-files.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static char *read_file(const char *path, size_t *size)
{
	FILE *f = fopen(path, "rb");
	if (!f)
		return NULL;
	fseek(f, 0, SEEK_END);
	long n = ftell(f);
	fseek(f, 0, SEEK_SET);
	char *data = malloc((size_t)n + 1);
	if (data && fread(data, 1, (size_t)n, f) != (size_t)n) {
		free(data);
		data = NULL;
	}
	fclose(f);
	*size = (size_t)n;
	return data;
}

static void memory_matches_disk(void **state)
{
	(void)state;
	char sample[1024];
	snprintf(sample, sizeof(sample), "%s/panel-2x16.yaml",
		 fixture_env("GP_SAMPLES"));
	struct gp_diag *diag = gp_diag_create();
	struct gp_design *design = gp_design_load(sample, NULL, 0, diag);
	assert_non_null(design);
	struct gp_build *build = gp_build_create(design, diag);
	assert_non_null(build);
	gp_build_set_epoch(build, 0);

	const struct gp_build *view = build;
	char *text = strdup(gp_build_check_text(view));
	assert_string_equal(gp_build_check_text(view), text);

	struct gp_outputs *outputs = gp_build_render(view, diag);
	assert_non_null(outputs);
	char *folder = fixture_temporary_folder("render");
	assert_true(gp_build_write(build, folder, diag));

	/* the same files, in the order gp_build_written lists them */
	const char *written = gp_build_written(view);
	size_t count = gp_outputs_count(outputs);
	assert_true(count >= 11);
	for (size_t i = 0; i < count; i++) {
		const char *name = gp_outputs_name(outputs, i);
		size_t length = strlen(name);
		assert_memory_equal(written, name, length);
		assert_int_equal(written[length], '\n');
		written += length + 1;
		char path[2048];
		snprintf(path, sizeof(path), "%s/%s", folder, name);
		size_t disk_size = 0, memory_size = 0;
		char *disk = read_file(path, &disk_size);
		assert_non_null(disk);
		const void *memory = gp_outputs_data(outputs, i, &memory_size);
		assert_int_equal(memory_size, disk_size);
		assert_memory_equal(memory, disk, disk_size);
		free(disk);
	}
	assert_string_equal(written, "");

	size_t size = 1;
	assert_non_null(gp_outputs_find(outputs, "pins.csv", &size));
	assert_true(size > 0);
	assert_null(gp_outputs_find(outputs, "no-such-file", &size));
	assert_int_equal(size, 0);
	assert_null(gp_outputs_name(outputs, count));
	assert_null(gp_outputs_data(outputs, count, &size));

	/* writing does not change the check text; the summary JSON now
	 * lists the files */
	assert_string_equal(gp_build_check_text(view), text);
	assert_non_null(strstr(gp_build_summary_json(view), "pins.csv"));

	free(text);
	gp_outputs_destroy(outputs);
	fixture_remove_tree(folder);
	free(folder);
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_destroy(diag);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(memory_matches_disk),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
