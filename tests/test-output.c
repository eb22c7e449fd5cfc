/* Outputs under faults: a write failing at any output file, a rename
 * failing, a read-only folder, a file in the way of the folder or of an
 * output, a symbolic link in the folder.  Each failure must leave the
 * folder exactly as it was: every entry (hidden ones included) with its
 * type, size and SHA-256 (GLib's implementation of FIPS 180-4) compared
 * before and after.  Also: names of outputs never leave the folder. */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include "test-files.h"

#include "build.h"
#include "output.h"

#include <dirent.h>
#include <errno.h>
#include <glib.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <signal.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#define CHUNK (1u << 20) /* write_all's largest write, output.c */

static char *path_join(const char *a, const char *b)
{
	char *path = malloc(strlen(a) + strlen(b) + 2);
	sprintf(path, "%s/%s", a, b);
	return path;
}

static void write_text(const char *path, const char *text)
{
	FILE *f = fopen(path, "w");
	assert_non_null(f);
	fputs(text, f);
	assert_int_equal(fclose(f), 0);
}

static int compare_names(const void *a, const void *b)
{
	return strcmp(*(char *const *)a, *(char *const *)b);
}

/* "name type size sha256" per entry, sorted; hidden entries included. */
static char *snapshot(const char *folder)
{
	DIR *dir = opendir(folder);
	if (!dir)
		return g_strdup("(no folder)\n");
	char *names[256];
	size_t n = 0;
	for (struct dirent *e; (e = readdir(dir));)
		if (strcmp(e->d_name, ".") && strcmp(e->d_name, "..")) {
			assert_true(n < 256);
			names[n++] = g_strdup(e->d_name);
		}
	closedir(dir);
	qsort(names, n, sizeof(*names), compare_names);
	GString *out = g_string_new("");
	for (size_t i = 0; i < n; i++) {
		char *path = path_join(folder, names[i]);
		struct stat st;
		assert_int_equal(lstat(path, &st), 0);
		gchar *data = NULL;
		gsize size = 0;
		char *sum = NULL;
		if (S_ISREG(st.st_mode)) {
			assert_true(g_file_get_contents(path, &data, &size,
							NULL));
			sum = g_compute_checksum_for_data(
				G_CHECKSUM_SHA256, (const guchar *)data, size);
		}
		g_string_append_printf(out, "%s %s %zu %s\n", names[i],
				       S_ISREG(st.st_mode)   ? "file"
				       : S_ISDIR(st.st_mode) ? "folder"
				       : S_ISLNK(st.st_mode) ? "link"
							     : "other",
				       (size_t)size, sum ? sum : "-");
		g_free(data);
		g_free(sum);
		g_free(names[i]);
		free(path);
	}
	return g_string_free(out, FALSE);
}

/* Builds a sample with overrides into an output set in memory. */
static void render(const char *sample, const char *const *overrides,
		   size_t override_count, struct gp_output_set *set)
{
	char *path = path_join(fixture_env("GP_SAMPLES"), sample);
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_design *design = gp_design_load(path, overrides,
						  override_count, &diag);
	struct gp_build *build = design ? gp_build_create(design, &diag)
					: NULL;
	gp_output_set_init(set);
	bool ok = build && gp_build_outputs(build, set, &diag);
	if (!ok)
		fail_msg("%s: %s", sample,
			 diag.count ? diag.entries[0].message : "?");
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_finish(&diag);
	free(path);
}

static bool commit(const struct gp_output_set *set, const char *folder,
		   char **first_error)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	bool ok = gp_output_commit(set, folder, &diag);
	if (first_error)
		*first_error = diag.count ? g_strdup(diag.entries[0].message)
					  : NULL;
	assert_true(ok == (diag.errors == 0));
	gp_diag_finish(&diag);
	return ok;
}

/* A folder holding a previous complete run (sample panel-2x16) and a
 * file of the user's: what every failed run must leave untouched. */
struct fixture {
	char *folder;
	struct gp_output_set before, after;
	char *expected;
};

static int setup(void **state)
{
	struct fixture *f = calloc(1, sizeof(*f));
	f->folder = fixture_temporary_folder("output");
	render("panel-2x16.yaml", NULL, 0, &f->before);
	/* a different result, so that old and new files differ */
	static const char *const change[] = {
		"blocks.main.cell_pitch=3.2",
		"glass.revision=B",
	};
	render("panel-2x16.yaml", change, 2, &f->after);
	assert_true(commit(&f->before, f->folder, NULL));
	char *notes = path_join(f->folder, "notes.txt");
	write_text(notes, "kept by the user\n");
	free(notes);
	f->expected = snapshot(f->folder);
	*state = f;
	return 0;
}

static int teardown(void **state)
{
	struct fixture *f = *state;
	gp_output_fail_after(0);
	gp_output_fail_rename_after(0);
	gp_output_commit_mode(GP_OUTPUT_COMMIT_AUTO);
	gp_output_kill_at(0);
	fixture_remove_tree(f->folder);
	free(f->folder);
	gp_output_set_finish(&f->before);
	gp_output_set_finish(&f->after);
	g_free(f->expected);
	free(f);
	return 0;
}

static size_t chunks(const struct gp_output_file *file)
{
	return (file->content.size + CHUNK - 1) / CHUNK;
}

/* For every output file, a write failing at its first and at its last
 * write (ENOSPC: the full-disk case) leaves the folder as it was. */
static void write_failure_at_each_file(void **state)
{
	struct fixture *f = *state;
	const struct gp_output_set *set = &f->after;
	size_t index = 0, tested = 0;
	assert_true(set->count >= 5); /* Gerber, proof, reports, sums */
	for (size_t i = 0; i < set->count; i++) {
		size_t n = chunks(&set->files[i]);
		size_t at[2] = { index + 1, index + n };
		for (int k = 0; k < 2 && n > 0; k++) {
			gp_output_fail_after((int)at[k]);
			char *error = NULL;
			assert_false(commit(set, f->folder, &error));
			gp_output_fail_after(0);
			assert_non_null(strstr(error, set->files[i].name));
			assert_non_null(strstr(error,
					       "No space left on device"));
			g_free(error);
			char *now = snapshot(f->folder);
			assert_string_equal(now, f->expected);
			g_free(now);
		}
		tested += n > 0;
		index += n;
	}
	for (size_t i = 0; i < set->count; i++)
		assert_true(chunks(&set->files[i]) > 0);
	assert_int_equal(tested, set->count);
	/* and without a fault, the new set replaces the old one */
	assert_true(commit(set, f->folder, NULL));
	for (size_t i = 0; i < set->count; i++) {
		char *path = path_join(f->folder, set->files[i].name);
		gchar *data;
		gsize size;
		assert_true(g_file_get_contents(path, &data, &size, NULL));
		assert_int_equal(size, set->files[i].content.size);
		assert_memory_equal(data, set->files[i].content.data, size);
		g_free(data);
		free(path);
	}
	char *notes = path_join(f->folder, "notes.txt");
	assert_true(access(notes, F_OK) == 0);
	free(notes);
}

/* A rename failing after others succeeded: those are rolled back (the
 * fallback that renames file by file); the one rename of a folder swap
 * failing leaves the old folder. */
static void rename_failure_rolls_back(void **state)
{
	struct fixture *f = *state;
	gp_output_fail_rename_after(1);
	char *swap_error = NULL;
	assert_false(commit(&f->after, f->folder, &swap_error));
	assert_non_null(strstr(swap_error, "cannot rename into place"));
	g_free(swap_error);
	char *left = snapshot(f->folder);
	assert_string_equal(left, f->expected);
	g_free(left);
	gp_output_commit_mode(GP_OUTPUT_COMMIT_IN_PLACE);
	for (size_t k = 1; k <= f->after.count; k++) {
		gp_output_fail_rename_after((int)k);
		char *error = NULL;
		assert_false(commit(&f->after, f->folder, &error));
		gp_output_fail_rename_after(0);
		assert_non_null(strstr(error, "cannot rename into place"));
		g_free(error);
		char *now = snapshot(f->folder);
		assert_string_equal(now, f->expected);
		g_free(now);
	}
}

/* A folder created by a failed run is removed again. */
static void failed_run_leaves_no_new_folder(void **state)
{
	struct fixture *f = *state;
	char *fresh = path_join(f->folder, "new");
	gp_output_fail_after(1);
	assert_false(commit(&f->after, fresh, NULL));
	gp_output_fail_after(0);
	assert_int_equal(access(fresh, F_OK), -1);
	char *now = snapshot(f->folder);
	assert_string_equal(now, f->expected);
	g_free(now);
	free(fresh);
}

/* Permissions do not stop root, so as root a folder no one can create
 * files in is used instead: /proc/self. */
static void read_only_folder(void **state)
{
	struct fixture *f = *state;
	char *error = NULL;
	if (geteuid() == 0) {
		assert_false(commit(&f->after, "/proc/self", &error));
	} else {
		assert_int_equal(chmod(f->folder, 0555), 0);
		assert_false(commit(&f->after, f->folder, &error));
		assert_int_equal(chmod(f->folder, 0755), 0);
		char *now = snapshot(f->folder);
		assert_string_equal(now, f->expected);
		g_free(now);
	}
	assert_non_null(strstr(error, "cannot write in this folder"));
	g_free(error);
}

static void file_in_the_way_of_folder(void **state)
{
	struct fixture *f = *state;
	char *notes = path_join(f->folder, "notes.txt");
	char *error = NULL;
	assert_false(commit(&f->after, notes, &error));
	assert_non_null(strstr(error, "exists and is not a folder"));
	g_free(error);
	char *now = snapshot(f->folder);
	assert_string_equal(now, f->expected);
	g_free(now);
	free(notes);
}

/* A folder with an output's name would fail its rename: refused before
 * anything is written. */
static void folder_in_the_way_of_output(void **state)
{
	struct fixture *f = *state;
	char *blocker = path_join(f->folder, f->after.files[2].name);
	assert_int_equal(unlink(blocker), 0);
	assert_int_equal(mkdir(blocker, 0755), 0);
	char *expected = snapshot(f->folder);
	char *error = NULL;
	assert_false(commit(&f->after, f->folder, &error));
	assert_non_null(strstr(error, "a folder is in the way"));
	char *now = snapshot(f->folder);
	assert_string_equal(now, expected);
	g_free(now);
	g_free(expected);
	g_free(error);
	assert_int_equal(rmdir(blocker), 0);
	free(blocker);
}

/* A symbolic link in the folder with an output's name is replaced by the
 * output, never written through; the folder itself may be a link (the
 * user named it) and is followed. */
static void links(void **state)
{
	struct fixture *f = *state;
	char *outside = path_join(f->folder, "outside");
	char *real = path_join(f->folder, "real");
	char *link_folder = path_join(f->folder, "link");
	assert_int_equal(mkdir(outside, 0755), 0);
	assert_int_equal(mkdir(real, 0755), 0);
	char *victim = path_join(outside, "victim.txt");
	write_text(victim, "not yours\n");
	char *trap = path_join(real, f->after.files[0].name);
	assert_int_equal(symlink("../outside/victim.txt", trap), 0);
	assert_int_equal(symlink("real", link_folder), 0);
	char *before = snapshot(outside);
	assert_true(commit(&f->after, link_folder, NULL));
	char *after = snapshot(outside);
	assert_string_equal(after, before);
	struct stat st;
	assert_int_equal(lstat(trap, &st), 0);
	assert_true(S_ISREG(st.st_mode));
	assert_int_equal(lstat(link_folder, &st), 0);
	assert_true(S_ISLNK(st.st_mode));
	g_free(before);
	g_free(after);
	free(trap);
	free(victim);
	free(outside);
	free(real);
	free(link_folder);
}

/* Names next to the fixture's folder that are temporaries of a commit. */
static size_t siblings_left(const char *folder)
{
	char *parent = g_path_get_dirname(folder);
	char *base = g_path_get_basename(folder);
	char *prefix = g_strdup_printf(".%s.gp-", base);
	DIR *dir = opendir(parent);
	assert_non_null(dir);
	size_t count = 0;
	for (struct dirent *e; (e = readdir(dir));)
		count += strncmp(e->d_name, prefix, strlen(prefix)) == 0;
	closedir(dir);
	g_free(prefix);
	g_free(base);
	g_free(parent);
	return count;
}

static bool checksums_pass(const char *folder)
{
	char *command = g_strdup_printf(
		"cd '%s' && sha256sum --quiet -c checksums.sha256 "
		">/dev/null 2>&1", folder);
	int status = system(command);
	g_free(command);
	return status == 0;
}

/* Kills a child committing the new set just before its step-th change to
 * the disk; returns false when the commit ended before that step. */
static bool killed_at(struct fixture *f, int mode, int step)
{
	fflush(NULL);
	pid_t child = fork();
	assert_true(child >= 0);
	if (child == 0) {
		struct gp_diag diag;
		gp_diag_init(&diag);
		gp_output_commit_mode(mode);
		gp_output_kill_at(step);
		_exit(gp_output_commit(&f->after, f->folder, &diag) ? 0 : 1);
	}
	int status;
	assert_int_equal(waitpid(child, &status, 0), child);
	if (WIFEXITED(status)) {
		assert_int_equal(WEXITSTATUS(status), 0);
		return false;
	}
	assert_true(WIFSIGNALED(status) && WTERMSIG(status) == SIGKILL);
	return true;
}

/* kill -9 at every step of a commit (both ways of swapping the folder):
 * the folder is always the whole old set or the whole new one, passing
 * sha256sum -c, and the next run clears what the killed one left.  In
 * the fallback without RENAME_EXCHANGE the folder may be missing after a
 * kill between its two renames; the next run puts the old one back. */
static void kill_at_every_step(void **state)
{
	struct fixture *f = *state;
	assert_true(commit(&f->after, f->folder, NULL));
	char *expected_new = snapshot(f->folder);
	static const int modes[] = { GP_OUTPUT_COMMIT_EXCHANGE,
				     GP_OUTPUT_COMMIT_RENAMES };
	for (size_t m = 0; m < 2; m++) {
		int step = 1, kills = 0;
		for (;; step++) {
			assert_true(commit(&f->before, f->folder, NULL));
			assert_int_equal(siblings_left(f->folder), 0);
			char *old = snapshot(f->folder);
			assert_string_equal(old, f->expected);
			g_free(old);
			if (!killed_at(f, modes[m], step))
				break;
			kills++;
			char *now = snapshot(f->folder);
			bool missing = !strcmp(now, "(no folder)\n");
			if (!(missing && modes[m] == GP_OUTPUT_COMMIT_RENAMES)) {
				if (strcmp(now, f->expected) &&
				    strcmp(now, expected_new))
					fail_msg("mode %d step %d: a mixed "
						 "folder:\n%s", modes[m], step,
						 now);
				assert_true(checksums_pass(f->folder));
			}
			g_free(now);
		}
		/* every write, sync and rename of the set was a step */
		assert_true(kills > (int)f->after.count * 3);
		char *now = snapshot(f->folder);
		assert_string_equal(now, expected_new);
		g_free(now);
	}
	g_free(expected_new);
}

/* Output names are plain names: nothing that could leave the folder. */
static void names_stay_in_the_folder(void **state)
{
	(void)state;
	static const char *const bad[] = {
		"../escape.gbr", "/etc/passwd", "a/b.gbr", ".hidden", "",
		"a\nb", "tab\there", "back\\slash", "..", "del\x7f",
	};
	struct gp_output_set set;
	gp_output_set_init(&set);
	for (size_t i = 0; i < sizeof(bad) / sizeof(bad[0]); i++) {
		struct gp_diag diag;
		gp_diag_init(&diag);
		assert_null(gp_output_add(&set, bad[i], &diag));
		assert_int_equal(diag.errors, 1);
		gp_diag_finish(&diag);
	}
	char long_name[300];
	memset(long_name, 'a', sizeof(long_name) - 1);
	long_name[sizeof(long_name) - 1] = '\0';
	struct gp_diag diag;
	gp_diag_init(&diag);
	assert_null(gp_output_add(&set, long_name, &diag));
	assert_non_null(gp_output_add(&set, "front-ito.gbr", &diag));
	assert_int_equal(diag.errors, 1);
	gp_diag_finish(&diag);
	gp_output_set_finish(&set);
}

/* Names taken from the description (part, title, block names) never
 * become file names: the outputs are named by the library alone. */
static void description_names_do_not_name_files(void **state)
{
	(void)state;
	static const char *const hostile[] = {
		"glass.part=../../etc/evil",
		"glass.title=/tmp/evil\\nline",
		"glass.revision=..",
	};
	struct gp_output_set plain, changed;
	render("panel-2x16.yaml", NULL, 0, &plain);
	render("panel-2x16.yaml", hostile, 3, &changed);
	assert_int_equal(plain.count, changed.count);
	for (size_t i = 0; i < plain.count; i++) {
		const char *name = changed.files[i].name;
		assert_string_equal(name, plain.files[i].name);
		assert_null(strchr(name, '/'));
		assert_true(name[0] != '.');
		for (const char *p = name; *p; p++)
			assert_true((unsigned char)*p >= 0x20);
	}
	gp_output_set_finish(&plain);
	gp_output_set_finish(&changed);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test_setup_teardown(write_failure_at_each_file,
						setup, teardown),
		cmocka_unit_test_setup_teardown(rename_failure_rolls_back,
						setup, teardown),
		cmocka_unit_test_setup_teardown(
			failed_run_leaves_no_new_folder, setup, teardown),
		cmocka_unit_test_setup_teardown(read_only_folder, setup,
						teardown),
		cmocka_unit_test_setup_teardown(file_in_the_way_of_folder,
						setup, teardown),
		cmocka_unit_test_setup_teardown(folder_in_the_way_of_output,
						setup, teardown),
		cmocka_unit_test_setup_teardown(links, setup, teardown),
		cmocka_unit_test_setup_teardown(kill_at_every_step, setup,
						teardown),
		cmocka_unit_test(names_stay_in_the_folder),
		cmocka_unit_test(description_names_do_not_name_files),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
