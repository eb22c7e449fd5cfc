/* A file replaced whole (lib/base/staged-file.c), and the dependency file
 * a build stages with it: a depfile that cannot be written fails the build
 * before anything is committed. */
#include "build.h"
#include "fixtures.h"
#include "staged-file.h"

#include <dirent.h>
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <cmocka.h>

/* Entries of folder, "." and ".." aside. */
static int entry_count(const char *folder)
{
	DIR *dir = opendir(folder);
	assert_non_null(dir);
	int count = 0;
	struct dirent *e;
	while ((e = readdir(dir)))
		count += strcmp(e->d_name, ".") != 0 && strcmp(e->d_name, "..") != 0;
	closedir(dir);
	return count;
}

static char *read_text(const char *path)
{
	FILE *file = fopen(path, "rb");
	if (!file)
		return NULL;
	char *text = calloc(1, 4096);
	assert_non_null(text);
	size_t n = fread(text, 1, 4095, file);
	text[n] = '\0';
	fclose(file);
	return text;
}

static char *path_in(const char *folder, const char *name)
{
	char *path = malloc(strlen(folder) + strlen(name) + 2);
	assert_non_null(path);
	sprintf(path, "%s/%s", folder, name);
	return path;
}

static void replaces_whole_and_leaves_nothing_else(void **state)
{
	struct fixture *f = *state;
	char *folder = fixture_temporary_folder("staged");
	char *path = path_in(folder, "page.txt");
	struct gp_staged_file file;
	assert_true(gp_staged_file_write(&file, path, "old\n", 4, &f->diag));
	/* staged: the temporary is there, the file not yet */
	assert_int_equal(entry_count(folder), 1);
	assert_null(read_text(path));
	assert_true(gp_staged_file_commit(&file, &f->diag));
	assert_true(gp_staged_file_write(&file, path, "new\n", 4, &f->diag));
	char *text = read_text(path);
	assert_string_equal(text, "old\n");
	free(text);
	assert_true(gp_staged_file_commit(&file, &f->diag));
	text = read_text(path);
	assert_string_equal(text, "new\n");
	free(text);
	assert_int_equal(entry_count(folder), 1);
	assert_int_equal(f->diag.count, 0);
	free(path);
	fixture_remove_tree(folder);
	free(folder);
}

static void discard_keeps_the_old_file(void **state)
{
	struct fixture *f = *state;
	char *folder = fixture_temporary_folder("staged");
	char *path = path_in(folder, "dep.d");
	struct gp_staged_file file;
	assert_true(gp_staged_file_write(&file, path, "a\n", 2, &f->diag));
	assert_true(gp_staged_file_commit(&file, &f->diag));
	assert_true(gp_staged_file_write(&file, path, "b\n", 2, &f->diag));
	gp_staged_file_discard(&file);
	char *text = read_text(path);
	assert_string_equal(text, "a\n");
	free(text);
	assert_int_equal(entry_count(folder), 1);
	free(path);
	fixture_remove_tree(folder);
	free(folder);
}

/* A folder in the way or a missing folder: an error naming the path, and
 * nothing written. */
static void refuses_what_it_cannot_replace(void **state)
{
	struct fixture *f = *state;
	char *folder = fixture_temporary_folder("staged");
	char *missing = path_in(folder, "no/dep.d");
	struct gp_staged_file file;
	assert_false(gp_staged_file_write(&file, folder, "x", 1, &f->diag));
	assert_false(gp_staged_file_write(&file, missing, "x", 1, &f->diag));
	gp_staged_file_discard(&file);
	assert_int_equal(f->diag.count, 2);
	assert_non_null(strstr(f->diag.entries[0].message, "not a plain file"));
	assert_non_null(strstr(f->diag.entries[1].message, missing));
	assert_int_equal(entry_count(folder), 0);
	free(missing);
	fixture_remove_tree(folder);
	free(folder);
}

static const char description[] =
	"glass: {part: GPX-STG1, revision: A}\n"
	"front: {size: [30, 16]}\n"
	"back: {size: [30, 13], position: [0, 3]}\n"
	"viewing_area: {position: [3, 5], size: [24, 8]}\n"
	"blocks:\n"
	"  main: {origin: [5, 11], cells: [2, 1], dots: [5, 7],\n"
	"         dot_size: [0.55, 0.6], dot_pitch: [0.6, 0.65],\n"
	"         cell_pitch: 4}\n";

static bool build_into(const char *folder, const char *revision,
		       const char *depfile, struct gp_diag *diag)
{
	const char *overrides[] = { revision };
	struct gp_design *design = gp_design_load_buffer(
		"stage.yaml", description, sizeof(description) - 1, overrides,
		1, diag);
	assert_non_null(design);
	struct gp_build *build = gp_build_create(design, diag);
	assert_non_null(build);
	assert_true(gp_build_select(build, "report", diag));
	gp_build_set_depfile(build, depfile);
	bool ok = gp_build_write(build, folder, diag);
	gp_build_destroy(build);
	gp_design_destroy(design);
	return ok;
}

/* The old set stays when the depfile cannot be staged; with a depfile
 * that can, the set and the depfile are both replaced. */
static void depfile_fails_before_the_commit(void **state)
{
	struct fixture *f = *state;
	char *folder = fixture_temporary_folder("staged");
	char *out = path_in(folder, "out");
	char *report = path_in(out, "report.txt");
	char *missing = path_in(folder, "no/dep.d");
	char *depfile = path_in(folder, "dep.d");
	assert_true(build_into(out, "glass.revision=A", NULL, &f->diag));
	assert_false(build_into(out, "glass.revision=B", missing, &f->diag));
	char *text = read_text(report);
	assert_non_null(strstr(text, "GPX-STG1 revision A\n"));
	free(text);
	assert_int_equal(entry_count(out), 3); /* report.txt, .json, sums */
	assert_int_equal(f->diag.errors, 1);
	assert_true(build_into(out, "glass.revision=B", depfile, &f->diag));
	text = read_text(report);
	assert_non_null(strstr(text, "GPX-STG1 revision B\n"));
	free(text);
	text = read_text(depfile);
	assert_non_null(strstr(text, "/out/checksums.sha256: stage.yaml\n"));
	free(text);
	assert_int_equal(entry_count(folder), 2); /* out, dep.d */
	free(depfile);
	free(missing);
	free(report);
	free(out);
	fixture_remove_tree(folder);
	free(folder);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test_setup_teardown(
			replaces_whole_and_leaves_nothing_else, setup, teardown),
		cmocka_unit_test_setup_teardown(discard_keeps_the_old_file,
						setup, teardown),
		cmocka_unit_test_setup_teardown(refuses_what_it_cannot_replace,
						setup, teardown),
		cmocka_unit_test_setup_teardown(
			depfile_fails_before_the_commit, setup, teardown),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
