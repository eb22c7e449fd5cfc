/* Digit rows at every duty, end to end through the library: a generated
 * matrix of glasses (figure x duty x point, colon, minus, half digit x 2
 * to 8 digits), each built, routed and checked with no error, and its
 * written files read back into a netlist (readback.h) that must match the
 * firmware map; the samples read back the same way; rows that cannot
 * exist refused with a clear message.  In process, outputs in memory, so
 * that the matrix stays cheap (the lead's budget for CI). */
#include "build.h"
#include "digits.h"
#include "readback.h"
#include "route.h"

#include <dirent.h>

#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "fixtures.h"

#define MM INT64_C(1000000)

static const char *env_or_fail(const char *name)
{
	const char *v = getenv(name);
	if (!v)
		fail_msg("%s is not set; run through 'meson test'", name);
	return v;
}

struct row_case {
	int figure, duty, count;
	const char *point;        /* "", "all", "some" */
	bool colon, minus, one;
};

/* Ordinary proportions for each figure (invented, as a designer would
 * draw them): 7 segments 10 x 5 mm, stroke 1, gap 0.2, slant 6. */
static int glass_text(const struct row_case *c, char *text, size_t size,
		      struct gp_box *inside)
{
	double pitch = 9, colon_pitch = 12;
	double width = 6 + (c->minus || c->one ? pitch : 0) +
		       (c->count - 1) * pitch + (c->colon ? colon_pitch - pitch : 0) +
		       5 + 6;
	double x0 = 6 + (c->minus || c->one ? pitch : 0);
	char point[96] = "", colon[96] = "";
	if (!strcmp(c->point, "all"))
		snprintf(point, sizeof(point), "    point: {size: 0.9}\n");
	else if (!strcmp(c->point, "some"))
		snprintf(point, sizeof(point), "    point: {size: 0.9, on: [1]}\n");
	if (c->colon)
		snprintf(colon, sizeof(colon),
			 "    colon: {after: [%d], size: 0.8, pitch: %g}\n",
			 c->count / 2, colon_pitch);
	*inside = gp_box_make(llround((3 - 0.4) * MM), llround((8 - 0.4) * MM),
			      llround((width - 3 + 0.4) * MM),
			      llround((8 + 15 + 0.4) * MM));
	return snprintf(text, size,
		"glass: {part: TEST-R%d, segments_on: front}\n"
		"front: {size: [%g, 26]}\n"
		"back: {size: [%g, 21], position: [0, 5]}\n"
		"viewing_area: {position: [3, 8], size: [%g, 15]}\n"
		"rules: {min_line: 0.03, min_space: 0.03, registration: 0.04}\n"
		"digits:\n"
		"  row:\n"
		"    origin: [%g, 11]\n    count: %d\n    pitch: %g\n"
		"    segments: %d\n    height: 10\n    width: 5\n"
		"    stroke: 1\n    gap: 0.2\n    slant: 6\n    ends: bevelled\n"
		"    duty: %d\n    minus: %s\n    one: %s\n%s%s"
		"ledges:\n"
		"  main: {side: bottom, plate: front, pitch: 0.5, pad_width: 0.25,"
		" pad_length: 2, edge_clearance: 0.5,"
		" connection: {method: elastomeric, pitch: 0.05}}\n"
		"leads: {width: 0.03, space: 0.03}\n"
		"seal: {width: 0.8, distance: 0.4}\n"
		"transfers: {size: 0.3, count: 2, place: seal}\n",
		c->duty, width, width, width - 6, x0, c->count, pitch, c->figure,
		c->duty, c->minus ? "true" : "false", c->one ? "true" : "false",
		point, colon);
}

static void describe(const struct row_case *c, char *buffer, size_t size)
{
	snprintf(buffer, size, "%d-segment x %d at duty %d, point '%s'%s%s%s",
		 c->figure, c->count, c->duty, c->point,
		 c->colon ? ", colon" : "", c->minus ? ", minus" : "",
		 c->one ? ", one" : "");
}

/* Builds the case and renders every output in memory. */
static struct gp_build *build_case(const struct row_case *c,
				   struct gp_design **design,
				   struct gp_output_set *set, struct gp_box *inside)
{
	char text[4096], name[160];
	glass_text(c, text, sizeof(text), inside);
	describe(c, name, sizeof(name));
	struct gp_diag diag;
	gp_diag_init(&diag);
	*design = gp_design_load_buffer("case.yaml", text, strlen(text), NULL,
					0, &diag);
	struct gp_build *build = *design ? gp_build_create(*design, &diag) : NULL;
	if (!build)
		fail_msg("%s: %s", name,
			 diag.count ? diag.entries[diag.count - 1].message : "?");
	for (size_t i = 0; i < build->checks.count; i++)
		if (build->checks.findings[i].severity == GP_SEVERITY_ERROR)
			fail_msg("%s: %s", name, build->checks.findings[i].text);
	gp_build_set_epoch(build, 0);
	gp_output_set_init(set);
	assert_true(gp_build_outputs(build, set, &diag));
	assert_int_equal(diag.errors, 0);
	gp_diag_finish(&diag);
	return build;
}

static void check_case(const struct row_case *c)
{
	char name[160], why[512];
	struct gp_design *design;
	struct gp_output_set set;
	struct gp_box inside;
	struct gp_build *build = build_case(c, &design, &set, &inside);
	describe(c, name, sizeof(name));
	if (!readback_check(&set, inside, env_or_fail("GP_TEST_TMP"), why,
			    sizeof(why)))
		fail_msg("%s: read back: %s", name, why);
	gp_output_set_finish(&set);
	gp_build_destroy(build);
	gp_design_destroy(design);
}

static struct gp_buffer *output(struct gp_output_set *set, const char *name)
{
	for (size_t i = 0; i < set->count; i++)
		if (strcmp(set->files[i].name, name) == 0)
			return &set->files[i].content;
	fail_msg("no %s", name);
	return NULL;
}

/* Puts text just before a Gerber file's end (its checksum attribute,
 * which is dropped, or M02), or keeps only what comes before its first
 * coordinate (cut). */
static void edit_gerber(struct gp_buffer *b, const char *text, bool cut)
{
	char *copy = malloc(b->size + 1);
	assert_non_null(copy);
	memcpy(copy, b->data, b->size);
	copy[b->size] = '\0';
	char *at = cut ? strstr(copy, "\nX") : strstr(copy, "%TF.MD5");
	if (cut && at)
		at++;
	if (!at)
		at = strstr(copy, "M02*");
	assert_non_null(at);
	*at = '\0';
	gp_buffer_finish(b);
	gp_buffer_init(b);
	assert_true(gp_buffer_puts(b, copy) && gp_buffer_puts(b, text) &&
		    gp_buffer_puts(b, "M02*\n"));
	free(copy);
}

/* The read-back test can fail: without the transfer dots the commons are
 * open; an extra sheet of back ITO over the viewing area shorts them;
 * a firmware map that puts digit 1's 'a' on another common disagrees. */
static void test_readback_catches(void **state)
{
	(void)state;
	struct row_case c = { 7, 3, 2, "all", false, false, false };
	static const char *const expect[] = { "open", "reaches", "glass-map.h" };
	for (int k = 0; k < 3; k++) {
		char why[512] = "";
		struct gp_design *design;
		struct gp_output_set set;
		struct gp_box inside;
		struct gp_build *build = build_case(&c, &design, &set, &inside);
		if (k == 0)
			edit_gerber(output(&set, "transfer.gbr"), "", true);
		if (k == 1)
			edit_gerber(output(&set, "back-ito.gbr"),
				    "G36*\nX4000000Y9000000D02*\n"
				    "X20000000Y9000000D01*\nX20000000Y22000000D01*\n"
				    "X4000000Y22000000D01*\nX4000000Y9000000D01*\n"
				    "G37*\n", false);
		if (k == 2) {
			/* digit 1's 'a' moved to another common */
			struct gp_buffer *h = output(&set, "glass-map.h");
			char *at = NULL;
			for (size_t i = 0; !at && i + 19 <= h->size; i++)
				if (!memcmp(h->data + i, "{ 1, 0, 0, 0, 1, 1,", 19))
					at = h->data + i;
			assert_non_null(at);
			at[14] = '3';
		}
		bool ok = readback_check(&set, inside, env_or_fail("GP_TEST_TMP"),
					 why, sizeof(why));
		if (ok || !strstr(why, expect[k]))
			fail_msg("mutation %d: %s (%s)", k, ok ? "passed" : "wrong",
				 why);
		gp_output_set_finish(&set);
		gp_build_destroy(build);
		gp_design_destroy(design);
	}
}

/* 7-segment rows at the duties laid out in bands or the grid, and static,
 * with every option; 2, 5 and 8 digits.  Under the sanitizers (about three
 * times slower) each option at one count, 2 or 8 digits by turns, to keep
 * the CI run short; the plain suite runs all of them. */
static void test_matrix_7(void **state)
{
	(void)state;
	static const int duties[] = { 1, 3, 4 };
	static const int counts[] = { 2, 5, 8 };
	static const struct row_case options[] = {
		{ 0, 0, 0, "", false, false, false },
		{ 0, 0, 0, "all", false, false, false },
		{ 0, 0, 0, "some", true, false, false },
		{ 0, 0, 0, "", true, false, false },
		{ 0, 0, 0, "all", false, true, true },
		{ 0, 0, 0, "", false, true, false },
		{ 0, 0, 0, "", false, false, true },
	};
	for (size_t d = 0; d < sizeof(duties) / sizeof(*duties); d++)
		for (size_t n = 0; n < sizeof(counts) / sizeof(*counts); n++)
			for (size_t o = 0; o < sizeof(options) / sizeof(*options);
			     o++) {
#ifdef GP_TEST_SANITIZED
				if (counts[n] != (o % 2 ? 2 : 8))
					continue;
#endif
				struct row_case c = options[o];
				c.figure = 7;
				c.duty = duties[d];
				c.count = counts[n];
				check_case(&c);
			}
}

/* Every sample read back: its pads, pieces and overlaps against its own
 * firmware map. */
static void test_samples_readback(void **state)
{
	(void)state;
	const char *folder = env_or_fail("GP_SAMPLES");
	DIR *dir = opendir(folder);
	assert_non_null(dir);
	int seen = 0;
	for (struct dirent *e; (e = readdir(dir));) {
		size_t n = strlen(e->d_name);
		if (n < 6 || strcmp(e->d_name + n - 5, ".yaml") != 0)
			continue;
		char path[1024], why[512];
		snprintf(path, sizeof(path), "%s/%s", folder, e->d_name);
		struct gp_diag diag;
		gp_diag_init(&diag);
		struct gp_design *design = gp_design_load(path, NULL, 0, &diag);
		struct gp_build *build = design ? gp_build_create(design, &diag) : NULL;
		if (!build)
			fail_msg("%s: %s", path, diag.count ?
				 diag.entries[diag.count - 1].message : "?");
		gp_build_set_epoch(build, 0);
		struct gp_output_set set;
		gp_output_set_init(&set);
		assert_true(gp_build_outputs(build, &set, &diag));
		/* inside the seal: the viewing area grown by its distance */
		int64_t d = design->routing->seal.distance;
		struct gp_box v = design->viewing;
		struct gp_box inside = gp_box_make(v.x0 - d, v.y0 - d, v.x1 + d,
						   v.y1 + d);
		if (!readback_check(&set, inside, env_or_fail("GP_TEST_TMP"), why,
				    sizeof(why)))
			fail_msg("%s: read back: %s", path, why);
		gp_output_set_finish(&set);
		gp_build_destroy(build);
		gp_design_destroy(design);
		gp_diag_finish(&diag);
		seen++;
	}
	closedir(dir);
	assert_true(seen >= 5);
}

/* Mixed glasses: a dot-matrix block with icons beside its lower rows (in
 * the way of their straight lead-outs, so that the commons turn toward
 * the ledge) and a digit row, each built with no error and read back. */
struct mixed_case {
	int cells, lines, rows;   /* block */
	int digits, duty;         /* digit row, 0 digits: none */
};

static int mixed_text(const struct mixed_case *c, char *text, size_t size,
		      struct gp_box *inside)
{
	char digits[512] = "";
	if (c->digits)
		snprintf(digits, sizeof(digits),
			 "digits:\n  row:\n    origin: [24, 11]\n"
			 "    count: %d\n    pitch: 9\n    segments: 7\n"
			 "    height: 8\n    width: 4.5\n    stroke: 0.9\n"
			 "    gap: 0.2\n    slant: 6\n    ends: bevelled\n"
			 "    point: {shape: round, size: 0.8}\n    duty: %d\n",
			 c->digits, c->duty);
	*inside = gp_box_make(llround((8 - 0.4) * MM), llround((9 - 0.4) * MM),
			      llround((62 + 0.4) * MM), llround((31 + 0.4) * MM));
	return snprintf(text, size,
		"glass: {part: TEST-M, segments_on: front}\n"
		"front: {size: [70, 34]}\n"
		"back: {size: [70, 28], position: [0, 6]}\n"
		"viewing_area: {position: [8, 9], size: [54, 22]}\n"
		"rules: {min_line: 0.03, min_space: 0.03, registration: 0.04}\n"
		"ledges:\n"
		"  main: {side: bottom, plate: front, pitch: 0.5, pad_width: 0.25,"
		" pad_length: 2, edge_clearance: 0.5,"
		" connection: {method: elastomeric, pitch: 0.1}}\n"
		"leads: {width: 0.03, space: 0.03}\n"
		"seal: {width: 0.8, distance: 0.4, fill_port: {side: top, width: 2}}\n"
		"transfers: {size: 0.3, count: 2, place: seal}\n"
		"blocks:\n  text:\n    origin: [11, 29]\n    cells: [%d, %d]\n"
		"    dots: [5, %d]\n    dot_size: [0.3, 0.3]\n"
		"    dot_pitch: [0.35, 0.35]\n    cell_pitch: 2.2\n"
		"    line_pitch: %g\n"
		"%s"
		"icons:\n"
		"  bell: {shape: circle, diameter: 1.2, position: [50, 27],"
		" common: alarm, segment: bell}\n"
		"  arrow: {shape: triangle, size: [1.4, 1], position: [53, 27],"
		" common: alarm, segment: arrow}\n",
		c->cells, c->lines, c->rows, c->rows * 0.35 + 0.6, digits);
}

static void check_text(const char *name, const char *text,
		       struct gp_box inside)
{
	char why[512];
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_design *design = gp_design_load_buffer(
		"case.yaml", text, strlen(text), NULL, 0, &diag);
	struct gp_build *build = design ? gp_build_create(design, &diag) : NULL;
	if (!build)
		fail_msg("%s: %s", name,
			 diag.count ? diag.entries[diag.count - 1].message : "?");
	for (size_t i = 0; i < build->checks.count; i++)
		if (build->checks.findings[i].severity == GP_SEVERITY_ERROR)
			fail_msg("%s: %s", name, build->checks.findings[i].text);
	gp_build_set_epoch(build, 0);
	struct gp_output_set set;
	gp_output_set_init(&set);
	assert_true(gp_build_outputs(build, &set, &diag));
	assert_int_equal(diag.errors, 0);
	if (!readback_check(&set, inside, env_or_fail("GP_TEST_TMP"), why,
			    sizeof(why)))
		fail_msg("%s: read back: %s", name, why);
	gp_output_set_finish(&set);
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_finish(&diag);
}

static void test_mixed_blocks_icons(void **state)
{
	(void)state;
	static const int blocks[][3] = { { 4, 1, 7 }, { 3, 2, 8 } };
	static const int digits[][2] = { { 0, 1 }, { 2, 1 }, { 4, 4 } };
	for (size_t b = 0; b < 2; b++)
		for (size_t d = 0; d < 3; d++) {
			struct mixed_case c = { blocks[b][0], blocks[b][1],
						blocks[b][2], digits[d][0],
						digits[d][1] };
			char text[4096], name[96];
			struct gp_box inside;
			mixed_text(&c, text, sizeof(text), &inside);
			snprintf(name, sizeof(name), "block %dx%d rows %d, %d "
				 "digits at duty %d, icons", c.cells, c.lines,
				 c.rows, c.digits, c.duty);
			check_text(name, text, inside);
		}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_readback_catches),
		cmocka_unit_test(test_samples_readback),
		cmocka_unit_test(test_matrix_7),
		cmocka_unit_test(test_mixed_blocks_icons),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
