/* End to end: the glassplot program builds every sample; the independent
 * reader gerbv (Debian package, 2.9) reads every Gerber file without a
 * complaint and draws the area and extent we computed (GEOS union of the
 * layer's shapes); and the pitch budget holds on the coordinates read back
 * from the written Gerber (Gerber Layer Format Specification 2024.05, §4.2:
 * format 4.6 in mm, so a coordinate integer is nanometres). */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include "fixtures.h"

#include "build.h"
#include "geos.h"
#include "gerbv-render.h"
#include "units.h"

#include <dirent.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

/* Whole-layer render: 0.0635 mm pixels (gerbv's window is limited to
 * about 2000 pixels a side).  Detail render of a 1600-pixel window in the
 * middle of the layer: 0.00635 mm pixels. */
#define DPI 400.0
#define DETAIL_DPI 4000.0
#define DETAIL_HALF_PX 800

static double ring_length_mm(const struct gp_ring *ring)
{
	double length = 0;
	for (size_t i = 0; i < ring->count; i++) {
		struct gp_point p = ring->points[i];
		struct gp_point q = ring->points[(i + 1) % ring->count];
		length += hypot((double)(q.x - p.x), (double)(q.y - p.y));
	}
	return length / 1e6;
}

/* What the layer should look like: union area, boundary length, extent. */
static bool expected_layer(const struct gp_artwork *art, enum gp_layer layer,
			   struct gerbv_expect *expect)
{
	struct gp_polyset filled, merged;
	gp_polyset_init(&filled);
	gp_polyset_init(&merged);
	struct gp_box extent = gp_box_none();
	bool strokes = false;
	double stroke_edge = 0;
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->layer != layer)
			continue;
		struct gp_box b = gp_polygon_bounds(&s->poly);
		if (s->line_width > 0) {
			strokes = true;
			stroke_edge += 2 * ring_length_mm(&s->poly.outer) +
				       3.1416 * gp_mm(s->line_width);
			int64_t h = s->line_width / 2;
			b = gp_box_make(b.x0 - h, b.y0 - h, b.x1 + h, b.y1 + h);
		} else {
			struct gp_polygon copy;
			assert_true(gp_polygon_copy(&copy, &s->poly));
			assert_true(gp_polyset_take(&filled, &copy));
		}
		extent = gp_box_union(extent, b);
	}
	if (gp_box_is_empty(extent))
		return false;
	memset(expect, 0, sizeof(*expect));
	expect->area_mm2 = -1;
	expect->perimeter_mm = stroke_edge;
	if (!strokes) {
		struct gp_geos *geos = gp_geos_create(NULL);
		assert_true(gp_geos_union_set(geos, &filled, &merged));
		assert_true(gp_geos_area_mm2(geos, &merged, &expect->area_mm2));
		for (size_t i = 0; i < merged.count; i++) {
			expect->perimeter_mm +=
				ring_length_mm(&merged.items[i].outer);
			for (size_t h = 0; h < merged.items[i].hole_count; h++)
				expect->perimeter_mm += ring_length_mm(
					&merged.items[i].holes[h]);
		}
		gp_geos_destroy(geos);
	}
	expect->check_extent = true;
	expect->x0 = gp_mm(extent.x0);
	expect->y0 = gp_mm(extent.y0);
	expect->x1 = gp_mm(extent.x1);
	expect->y1 = gp_mm(extent.y1);
	gp_polyset_finish(&filled);
	gp_polyset_finish(&merged);
	return true;
}

static double polyset_perimeter_mm(const struct gp_polyset *set)
{
	double length = 0;
	for (size_t i = 0; i < set->count; i++) {
		length += ring_length_mm(&set->items[i].outer);
		for (size_t h = 0; h < set->items[i].hole_count; h++)
			length += ring_length_mm(&set->items[i].holes[h]);
	}
	return length;
}

/* The filled shapes of a layer, merged. */
static void layer_union(const struct gp_artwork *art, enum gp_layer layer,
			struct gp_geos *geos, struct gp_polyset *merged)
{
	struct gp_polyset filled;
	gp_polyset_init(&filled);
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->layer != layer || s->line_width > 0)
			continue;
		struct gp_polygon copy;
		assert_true(gp_polygon_copy(&copy, &s->poly));
		assert_true(gp_polyset_take(&filled, &copy));
	}
	assert_true(gp_geos_union_set(geos, &filled, merged));
	gp_polyset_finish(&filled);
}

/* A fine render of the middle of a filled layer: the dark area agrees
 * with GEOS's area of the layer inside the same window to within half a
 * pixel along every boundary (a pixel is dark when its centre is inside). */
static void check_detail(const char *gbr, const char *png,
			 const struct gp_artwork *art, enum gp_layer layer,
			 const struct gerbv_expect *whole)
{
	double px = 25.4 / DETAIL_DPI;
	double cx = (whole->x0 + whole->x1) / 2, cy = (whole->y0 + whole->y1) / 2;
	struct gerbv_frame frame = { cx - DETAIL_HALF_PX * px,
				     cy - DETAIL_HALF_PX * px,
				     cx + DETAIL_HALF_PX * px,
				     cy + DETAIL_HALF_PX * px, DETAIL_DPI, 0 };
	/* the window gerbv_render uses: whole pixels of the glass frame */
	struct gp_box window = gp_box_make(
		llround(floor(frame.x0 / px) * px * 1e6),
		llround(floor(frame.y0 / px) * px * 1e6),
		llround(ceil(frame.x1 / px) * px * 1e6),
		llround(ceil(frame.y1 / px) * px * 1e6));
	struct gp_geos *geos = gp_geos_create(NULL);
	struct gp_polyset merged, clip, inside;
	gp_polyset_init(&merged);
	gp_polyset_init(&clip);
	gp_polyset_init(&inside);
	layer_union(art, layer, geos, &merged);
	struct gp_polygon box;
	gp_polygon_init(&box);
	assert_true(gp_polygon_set_box(&box, window));
	assert_true(gp_polyset_take(&clip, &box));
	assert_true(gp_geos_intersection(geos, &merged, &clip, &inside));
	struct gerbv_expect expect = { 0 };
	assert_true(gp_geos_area_mm2(geos, &inside, &expect.area_mm2));
	expect.perimeter_mm = polyset_perimeter_mm(&inside) / 2;
	struct gerbv_result result;
	char err[256], why[512];
	if (!gerbv_render(fixture_env("GERBV"), gbr, png, &frame, &result, err,
			  sizeof(err)))
		fail_msg("%s: %s", gbr, err);
	bool agrees = gerbv_compare(&result, &expect, why, sizeof(why));
	gerbv_result_finish(&result);
	if (!agrees)
		fail_msg("%s (detail at %.3f, %.3f mm): %s", gbr, cx, cy, why);
	gp_polyset_finish(&merged);
	gp_polyset_finish(&clip);
	gp_polyset_finish(&inside);
	gp_geos_destroy(geos);
}

/* The second reader (tests/gerber-js/measure.js: tracespace's gerber-
 * parser, gerber-plotter and gerber-to-svg under node), run when the test
 * is started with --second-reader. */
static bool second_reader;

static void run_second(const char *gbr, const struct gerbv_frame *frame,
		       struct gerbv_result *out)
{
	char command[2048], line[1024];
	snprintf(command, sizeof(command),
		 "'%s' '%s' '%s' %.6f %.6f %.6f %.6f %.1f %d 2>&1",
		 fixture_env("GP_NODE"), fixture_env("GP_SECOND_READER_SCRIPT"),
		 gbr, frame->x0, frame->y0, frame->x1, frame->y1, frame->dpi,
		 frame->margin_px);
	FILE *pipe = popen(command, "r");
	assert_non_null(pipe);
	if (!fgets(line, sizeof(line), pipe))
		line[0] = '\0';
	int status = pclose(pipe);
	memset(out, 0, sizeof(*out));
	int objects = 0, svg = 0;
	if (status != 0 ||
	    sscanf(line, "area %lf extent %lf %lf %lf %lf objects %d svg %d",
		   &out->area_mm2, &out->x0, &out->y0, &out->x1, &out->y1,
		   &objects, &svg) != 7)
		fail_msg("%s: the second reader: %s", gbr, line);
	out->pixel_mm = 25.4 / frame->dpi;
	out->any_dark = out->area_mm2 > 0;
	out->complaints = calloc(1, 1);
	assert_non_null(out->complaints);
	assert_true(objects > 0 && svg > 0);
}

/* The second reader parses the file without a complaint, its render
 * agrees with the computed area and extent within gerbv's tolerance
 * (half a pixel along every boundary, gerbv_compare), and with gerbv's
 * render within twice that (each is within it of the truth); layers of
 * lines only, which have no computed area, are held to gerbv's render
 * alone within that tolerance of their lines' edges. */
static void check_second(const char *gbr, const struct gerbv_frame *frame,
			 const struct gerbv_expect *expect,
			 const struct gerbv_result *gerbv)
{
	struct gerbv_result js;
	char why[512];
	run_second(gbr, frame, &js);
	if (!gerbv_compare(&js, expect, why, sizeof(why)))
		fail_msg("%s: the second reader: %s", gbr, why);
	double px = js.pixel_mm;
	double tolerance = 2 * (expect->perimeter_mm * px + px * px);
	if (fabs(js.area_mm2 - gerbv->area_mm2) > tolerance)
		fail_msg("%s: the second reader draws %.6f mm2, gerbv %.6f mm2 "
			 "(+- %.6f)", gbr, js.area_mm2, gerbv->area_mm2,
			 tolerance);
	printf("%s: second reader %.6f mm2, gerbv %.6f mm2, computed %.6f "
	       "mm2\n", gbr, js.area_mm2, gerbv->area_mm2, expect->area_mm2);
	gerbv_result_finish(&js);
}

static void check_layer(const char *folder, const struct gp_artwork *art,
			enum gp_layer layer)
{
	struct gerbv_expect expect;
	char gbr[1024], png[1024], err[256], why[512];
	snprintf(gbr, sizeof(gbr), "%s/%s.gbr", folder, gp_layer_name(layer));
	if (!expected_layer(art, layer, &expect)) {
		assert_int_not_equal(access(gbr, F_OK), 0);
		return;
	}
	snprintf(png, sizeof(png), "%s/%s.png", folder, gp_layer_name(layer));
	struct gerbv_frame frame = { expect.x0, expect.y0, expect.x1,
				     expect.y1, DPI, 8 };
	struct gerbv_result result;
	if (!gerbv_render(fixture_env("GERBV"), gbr, png, &frame, &result, err,
			  sizeof(err)))
		fail_msg("%s: %s", gbr, err);
	bool agrees = gerbv_compare(&result, &expect, why, sizeof(why));
	if (!agrees)
		fail_msg("%s: %s", gbr, why);
	if (second_reader)
		check_second(gbr, &frame, &expect, &result);
	else if (expect.area_mm2 >= 0)
		check_detail(gbr, png, art, layer, &expect);
	gerbv_result_finish(&result);
}

static void check_sample(const char *path)
{
	char *folder = fixture_temporary_folder("e2e");
	char command[4096];
	snprintf(command, sizeof(command), "'%s' build -q '%s' -o '%s/out'",
		 fixture_env("GLASSPLOT"), path, folder);
	assert_int_equal(system(command), 0);
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_design *design = gp_design_load(path, NULL, 0, &diag);
	assert_non_null(design);
	struct gp_build *build = gp_build_create(design, &diag);
	assert_non_null(build);
	char out[600];
	snprintf(out, sizeof(out), "%s/out", folder);
	for (int layer = 0; layer < GP_LAYER_COUNT; layer++)
		check_layer(out, &build->art, (enum gp_layer)layer);
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_finish(&diag);
	fixture_remove_tree(folder);
	free(folder);
}

static void samples_read_by_gerbv(void **state)
{
	(void)state;
	const char *samples = fixture_env("GP_SAMPLES");
	DIR *dir = opendir(samples);
	assert_non_null(dir);
	int count = 0;
	struct dirent *entry;
	while ((entry = readdir(dir))) {
		size_t n = strlen(entry->d_name);
		if (n < 6 || strcmp(entry->d_name + n - 5, ".yaml") != 0)
			continue;
		char path[1024];
		snprintf(path, sizeof(path), "%s/%s", samples, entry->d_name);
		check_sample(path);
		count++;
	}
	closedir(dir);
	assert_true(count >= 1);
}

/* Coordinates of every D01/D02 in a Gerber file, x only. */
static void gerber_x_range(const char *path, int64_t *x0, int64_t *x1)
{
	FILE *file = fopen(path, "r");
	assert_non_null(file);
	char line[256];
	*x0 = INT64_MAX;
	*x1 = INT64_MIN;
	while (fgets(line, sizeof(line), file)) {
		long long x, y;
		int op;
		if (sscanf(line, "X%lldY%lldD%d*", &x, &y, &op) != 3)
			continue;
		*x0 = x < *x0 ? x : *x0;
		*x1 = x > *x1 ? x : *x1;
	}
	fclose(file);
}

/* For cell counts up to 1000 and awkward pitches, the last cell's place
 * read back from the Gerber file is origin + (n - 1) * pitch to the
 * nanometre, and the span is exact (DESIGN.md §3). */
static void pitch_budget_in_gerber(void **state)
{
	(void)state;
	static const char *const pitches[] = { "4.123457", "0.999999" };
	static const long counts[] = { 1, 2, 3, 17, 999, 1000 };
	for (size_t p = 0; p < 2; p++)
	for (size_t c = 0; c < 6; c++) {
		char text[1024];
		snprintf(text, sizeof(text),
			 "glass: {part: PITCH}\n"
			 "front: {size: [4200, 20]}\n"
			 "back: {size: [4200, 20]}\n"
			 "viewing_area: {position: [1, 1], size: [4190, 18]}\n"
			 "rules: {registration: 0.1}\n"
			 "blocks:\n"
			 "  row:\n"
			 "    origin: [3.000001, 15]\n"
			 "    cells: [%ld, 1]\n"
			 "    dots: [1, 1]\n"
			 "    dot_size: [0.4, 0.5]\n"
			 "    dot_pitch: [0.5, 0.6]\n"
			 "    cell_pitch: %s\n",
			 counts[c], pitches[p]);
		struct gp_diag diag;
		gp_diag_init(&diag);
		struct gp_design *design = gp_design_load_buffer(
			"pitch.yaml", text, strlen(text), NULL, 0, &diag);
		assert_non_null(design);
		struct gp_build *build = gp_build_create(design, &diag);
		assert_non_null(build);
		char *folder = fixture_temporary_folder("e2e");
		assert_true(gp_build_write(build, folder, &diag));
		char path[600];
		snprintf(path, sizeof(path), "%s/front-ito.gbr", folder);
		int64_t x0, x1;
		gerber_x_range(path, &x0, &x1);
		int64_t pitch = design->blocks[0].cell_pitch;
		/* segments are the dot columns: first left edge at the origin,
		 * last right edge at origin + (n-1) * pitch + dot width */
		assert_int_equal(x0, INT64_C(3000001));
		assert_int_equal(x1, INT64_C(3000001) + (counts[c] - 1) * pitch +
					     400000);
		gp_build_destroy(build);
		gp_design_destroy(design);
		gp_diag_finish(&diag);
		fixture_remove_tree(folder);
		free(folder);
	}
}

int main(int argc, char **argv)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(samples_read_by_gerbv),
		cmocka_unit_test(pitch_budget_in_gerber),
	};
	if (argc > 1 && strcmp(argv[1], "--second-reader") == 0) {
		const char *node = getenv("GP_NODE");
		const char *modules = getenv("NODE_PATH");
		char probe[2048];
		snprintf(probe, sizeof(probe), "%s/gerber-to-svg/package.json",
			 modules ? modules : "");
		if (!node || !node[0] || access(probe, R_OK) != 0) {
			fprintf(stderr, "the second Gerber reader is not "
				"installed (node and %s): run sh "
				".ci/install-deps\n", probe);
			/* 77: meson's SKIP; a failure where it must run */
			return getenv("GP_REQUIRE_SECOND_READER") ? 1 : 77;
		}
		second_reader = true;
		return cmocka_run_group_tests(tests, NULL, NULL);
	}
	return cmocka_run_group_tests(tests, NULL, NULL);
}
