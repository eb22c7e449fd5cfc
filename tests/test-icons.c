/* Icons: reading, shapes, joins, back patches and registration, checked
 * against elementary geometry, GEOS (areas, overlaps) and the independent
 * Gerber reader gerbv (holes read back). */
#include "build.h"
#include "digits.h"
#include "geos.h"
#include "icons.h"
#include "patch.h"
#include "route.h"

#include "gerbv-render.h"

#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>

#define PI 3.14159265358979323846
#define MM INT64_C(1000000)
#define TOL_MM 0.001 /* chord tolerance of the descriptions below */

/* A glass with no dot matrix unless a test adds one; %s is the
 * registration margin, then the blocks and icons sections. */
static const char base[] =
	"glass:\n"
	"  part: TEST-ICONS\n"
	"  segments_on: front\n"
	"front:\n"
	"  size: [40, 24]\n"
	"  position: [0, 0]\n"
	"back:\n"
	"  size: [40, 20]\n"
	"  position: [0, 4]\n"
	"viewing_area:\n"
	"  position: [1, 5]\n"
	"  size: [38, 18]\n"
	"rules:\n"
	"  min_line: 0.03\n"
	"  min_space: 0.03\n"
	"  registration: %s\n"
	"  chord_tolerance: 0.001\n"
	"%s"
	"icons:\n%s";

static const char block[] =
	"blocks:\n"
	"  main:\n"
	"    origin: [5, 22]\n"
	"    cells: [4, 1]\n"
	"    dots: [5, 8]\n"
	"    dot_size: [0.45, 0.5]\n"
	"    dot_pitch: [0.5, 0.55]\n"
	"    cell_pitch: 3\n";

struct built {
	struct gp_diag diag;
	struct gp_design *design;
	struct gp_build *build;
};

static void dump(const struct gp_diag *diag)
{
	for (size_t i = 0; i < diag->count; i++)
		fprintf(stderr, "  %s\n", diag->entries[i].message);
}

/* The same with room for a seal and a ledge below it. */
static const char routed_base[] =
	"glass:\n"
	"  part: TEST-LEADS\n"
	"  segments_on: front\n"
	"front:\n"
	"  size: [46, 30]\n"
	"  position: [0, 0]\n"
	"back:\n"
	"  size: [46, 26]\n"
	"  position: [0, 4]\n"
	"viewing_area:\n"
	"  position: [6, 9]\n"
	"  size: [34, 14]\n"
	"rules:\n"
	"  min_line: 0.03\n"
	"  min_space: 0.03\n"
	"  registration: %s\n"
	"%s"
	"icons:\n%s";

static bool use_routed_base;

/* Loads and builds; false (with diag kept) when either fails. */
static bool try_build(struct built *b, const char *registration,
		      const char *blocks, const char *icons)
{
	size_t size = sizeof(base) + sizeof(routed_base) +
		      strlen(registration) + strlen(blocks) + strlen(icons);
	char *text = malloc(size);
	if (use_routed_base)
		snprintf(text, size, routed_base, registration, blocks, icons);
	else
		snprintf(text, size, base, registration, blocks, icons);
	gp_diag_init(&b->diag);
	b->build = NULL;
	b->design = gp_design_load_buffer("test.yaml", text, strlen(text),
					  NULL, 0, &b->diag);
	free(text);
	if (b->design)
		b->build = gp_build_create(b->design, &b->diag);
	return b->build != NULL;
}

static void make(struct built *b, const char *registration,
		 const char *blocks, const char *icons)
{
	if (!try_build(b, registration, blocks, icons)) {
		dump(&b->diag);
		fail_msg("the description did not build");
	}
}

static void finish(struct built *b)
{
	gp_build_destroy(b->build);
	gp_design_destroy(b->design);
	gp_diag_finish(&b->diag);
}

static bool has_message(const struct gp_diag *diag, const char *part)
{
	for (size_t i = 0; i < diag->count; i++)
		if (strstr(diag->entries[i].message, part))
			return true;
	return false;
}

static void expect_message(const struct gp_diag *diag, const char *part)
{
	if (!has_message(diag, part)) {
		dump(diag);
		fail_msg("no message containing '%s'", part);
	}
}

/* The pixel of icon i (icons add one pixel each). */
static const struct gp_pixel *icon_pixel(const struct gp_artwork *art,
					 size_t icon)
{
	for (size_t i = 0; i < art->pixel_count; i++)
		if (art->pixels[i].owner_kind == GP_OWNER_ICON &&
		    art->pixels[i].owner == (int)icon)
			return &art->pixels[i];
	fail_msg("no pixel for icon %zu", icon);
	return NULL;
}

/* Shapes on a layer, of a role (-1: any) and net (-1: any), copied. */
static void shapes(const struct gp_artwork *art, enum gp_layer layer,
		   int role, int net, struct gp_polyset *out)
{
	gp_polyset_init(out);
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->layer != layer || (role >= 0 && (int)s->role != role) ||
		    (net >= 0 && s->net != net))
			continue;
		struct gp_polygon copy;
		assert_true(gp_polygon_copy(&copy, &s->poly));
		assert_true(gp_polyset_take(out, &copy));
	}
}

static size_t holes(const struct gp_polyset *set)
{
	size_t n = 0;
	for (size_t i = 0; i < set->count; i++)
		n += set->items[i].hole_count;
	return n;
}

/* The icon's electrode: front ELECTRODE shapes of its segment inside its
 * pixel's box (the pixel's region adds the lit spurs of bridges). */
static void electrode_of(const struct gp_artwork *art,
			 const struct gp_pixel *p, struct gp_polyset *out)
{
	gp_polyset_init(out);
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->layer != GP_LAYER_FRONT_ITO ||
		    s->role != GP_ROLE_ELECTRODE || s->net != p->segment)
			continue;
		struct gp_box b = gp_polygon_bounds(&s->poly);
		if (b.x0 < p->box.x0 || b.x1 > p->box.x1 || b.y0 < p->box.y0 ||
		    b.y1 > p->box.y1)
			continue;
		struct gp_polygon copy;
		assert_true(gp_polygon_copy(&copy, &s->poly));
		assert_true(gp_polyset_take(out, &copy));
	}
	assert_true(out->count > 0);
}

static void region_of(const struct gp_pixel *p, struct gp_polyset *out)
{
	gp_polyset_init(out);
	struct gp_polygon copy;
	assert_true(gp_polygon_copy(&copy, &p->shape));
	assert_true(gp_polyset_take(out, &copy));
	for (size_t k = 0; k < p->more.count; k++) {
		assert_true(gp_polygon_copy(&copy, &p->more.items[k]));
		assert_true(gp_polyset_take(out, &copy));
	}
}

/* --- shapes against elementary geometry ------------------------------- */

static const char shape_icons[] =
	"  rect:\n"
	"    shape: rectangle\n    size: [4, 2]\n    position: [5, 10]\n"
	"    common: c1\n    segment: s1\n"
	"  rounded:\n"
	"    shape: rounded_rectangle\n    size: [4, 2]\n    radius: 0.5\n"
	"    position: [11, 10]\n    common: c1\n    segment: s2\n"
	"  disc:\n"
	"    shape: circle\n    diameter: 2\n    position: [17, 10]\n"
	"    common: c1\n    segment: s3\n"
	"  ring:\n"
	"    shape: ring\n    diameter: 3\n    width: 0.5\n"
	"    position: [23, 10]\n    common: c1\n    segment: s4\n"
	"  tri:\n"
	"    shape: triangle\n    size: [2, 1.5]\n    rotate: 90\n"
	"    position: [30, 10]\n    common: c1\n    segment: s5\n"
	"  arrow:\n"
	"    shape: arrow\n    size: [4, 2]\n    shaft: 0.6\n    head: 1\n"
	"    position: [8, 16]\n    common: c1\n    segment: s6\n"
	"  ell:\n"
	"    shape: polygon\n"
	"    points: [[0, 0], [3, 0], [3, 1], [1, 1], [1, 2.5], [0, 2.5]]\n"
	"    position: [18, 15]\n    mirror: true\n"
	"    common: c1\n    segment: s7\n";

/* Area of a pixel's nominal lit region (its electrode), mm^2. */
static double pixel_area(const struct gp_pixel *p)
{
	return gp_polygon_area_mm2(&p->shape) + gp_polyset_area_mm2(&p->more);
}

static void test_shape_areas(void **state)
{
	struct built b;
	make(&b, "0.1", "", shape_icons);
	const struct gp_artwork *art = &b.build->art;
	/* Curves have their vertices on the curve, so the polygon is short
	 * of the true area by at most perimeter x chord tolerance. */
	double r = 0.5;
	struct {
		double want, below, above;
	} cases[] = {
		{ 8, 0, 0 },                                   /* w h */
		{ 8 - (4 - PI) * r * r, 2 * PI * r * TOL_MM, 0 },
		{ PI, 2 * PI * TOL_MM, 0 },                    /* pi r^2 */
		{ PI * (1.5 * 1.5 - 1), 2 * PI * 1.5 * TOL_MM,
		  2 * PI * TOL_MM },                           /* ring */
		{ 1.5, 0, 0 },                                 /* b h / 2 */
		{ 0.6 * 3 + 1 * 2 / 2.0, 0, 0 },               /* shaft+head */
		{ 3 * 1 + 1 * 1.5, 0, 0 },                     /* L */
	};
	for (size_t i = 0; i < 7; i++) {
		double got = pixel_area(icon_pixel(art, i));
		double lo = cases[i].want - cases[i].below - 1e-9;
		double hi = cases[i].want + cases[i].above + 1e-9;
		if (got < lo || got > hi)
			fail_msg("icon %zu: area %.9f mm2, expected %.9f (-%g "
				 "+%g)", i, got, cases[i].want, cases[i].below,
				 cases[i].above);
	}
	/* exact boxes: the rectangle, the circle (vertices at the four
	 * quadrant points), the triangle turned to point left */
	struct gp_box box = icon_pixel(art, 0)->box;
	assert_true(box.x0 == 3 * MM && box.y0 == 9 * MM && box.x1 == 7 * MM &&
		    box.y1 == 11 * MM);
	box = icon_pixel(art, 2)->box;
	assert_true(box.x0 == 16 * MM && box.y0 == 9 * MM &&
		    box.x1 == 18 * MM && box.y1 == 11 * MM);
	box = icon_pixel(art, 4)->box;
	assert_true(box.x0 == 30 * MM - 750000 && box.x1 == 30 * MM + 750000);
	assert_true(box.y0 == 9 * MM && box.y1 == 11 * MM);
	/* mirrored L: corners given at x >= 0 land at x <= 18 */
	box = icon_pixel(art, 6)->box;
	assert_true(box.x0 == 15 * MM && box.x1 == 18 * MM);
	/* the ring has one hole, the disc none */
	assert_int_equal(icon_pixel(art, 3)->shape.hole_count, 1);
	assert_int_equal(icon_pixel(art, 2)->shape.hole_count, 0);
	finish(&b);
}

/* --- holes survive into the Gerber, as gerbv reads it ------------------ */

static const char *env(const char *name)
{
	const char *value = getenv(name);
	if (!value)
		fail_msg("%s is not set; run through 'meson test'", name);
	return value;
}

static double perimeter_mm(const struct gp_polyset *set)
{
	double length = 0;
	for (size_t i = 0; i < set->count; i++)
		for (size_t r = 0; r <= set->items[i].hole_count; r++) {
			const struct gp_ring *ring =
				r ? &set->items[i].holes[r - 1]
				  : &set->items[i].outer;
			for (size_t k = 0; k < ring->count; k++) {
				struct gp_point p = ring->points[k];
				struct gp_point q =
					ring->points[(k + 1) % ring->count];
				length += hypot((double)(q.x - p.x),
						(double)(q.y - p.y)) / 1e6;
			}
		}
	return length;
}

/* Renders the window around part with gerbv and compares with what the
 * merged front layer has in that window (GEOS). */
static void check_window(struct gp_geos *geos, const char *gbr,
			 const char *png, const struct gp_polyset *merged,
			 const struct gp_polygon *part)
{
	struct gp_box b = gp_polygon_bounds(part);
	double side = fmax(gp_box_width(b), gp_box_height(b)) / 1e6 + 0.1;
	/* gerbv reads only a short --origin: resolutions of the form
	 * 2^a 5^b keep origin / dpi a short decimal */
	static const double dpis[] = { 10000, 8000, 5000, 4000, 2500, 2000,
				       1000 };
	double dpi = 500;
	for (size_t i = 0; i < 7 && dpi == 500; i++)
		if (side / 25.4 * dpis[i] <= 1000)
			dpi = dpis[i];
	double px = 25.4 / dpi;
	struct gerbv_frame frame = { b.x0 / 1e6 - 0.05, b.y0 / 1e6 - 0.05,
				     b.x1 / 1e6 + 0.05, b.y1 / 1e6 + 0.05,
				     dpi, 0 };
	/* gerbv_render widens the frame to whole pixels of the glass frame */
	struct gp_box window = gp_box_make(
		llround(floor(frame.x0 / px) * px * 1e6),
		llround(floor(frame.y0 / px) * px * 1e6),
		llround(ceil(frame.x1 / px) * px * 1e6),
		llround(ceil(frame.y1 / px) * px * 1e6));
	struct gp_polyset clip, inside;
	gp_polyset_init(&clip);
	gp_polyset_init(&inside);
	struct gp_polygon box;
	gp_polygon_init(&box);
	assert_true(gp_polygon_set_box(&box, window));
	assert_true(gp_polyset_take(&clip, &box));
	assert_true(gp_geos_intersection(geos, merged, &clip, &inside));
	struct gerbv_expect expect = { 0 };
	assert_true(gp_geos_area_mm2(geos, &inside, &expect.area_mm2));
	/* the window's own edges are no drawing boundary: half of the
	 * clipped perimeter is a fair bound, as in the e2e test */
	expect.perimeter_mm = perimeter_mm(&inside);
	double error = expect.perimeter_mm * px + px * px;
	for (size_t h = 0; h < part->hole_count; h++) {
		double hole = fabs(gp_ring_area2(&part->holes[h])) / 2e12;
		if (hole <= error)
			fail_msg("a hole of %.4f mm2 would hide in the render "
				 "error %.4f mm2", hole, error);
	}
	struct gerbv_result result;
	char err[256], why[512];
	if (!gerbv_render(env("GERBV"), gbr, png, &frame, &result, err,
			  sizeof(err)))
		fail_msg("%s", err);
	bool agrees = gerbv_compare(&result, &expect, why, sizeof(why));
	if (part->hole_count)
		print_message("part with %zu hole(s) at %.2f, %.2f mm: GEOS "
			      "%.4f mm2, gerbv %.4f mm2 (render error up to "
			      "%.4f)\n", part->hole_count, b.x0 / 1e6,
			      b.y0 / 1e6, expect.area_mm2, result.area_mm2,
			      error);
	gerbv_result_finish(&result);
	if (!agrees)
		fail_msg("window at %.3f, %.3f mm: %s", frame.x0, frame.y0,
			 why);
	gp_polyset_finish(&clip);
	gp_polyset_finish(&inside);
}

static void test_holes_read_back_by_gerbv(void **state)
{
	struct built b;
	make(&b, "0.1", "",
	     "  ring:\n"
	     "    shape: ring\n    diameter: 3\n    width: 0.5\n"
	     "    position: [6, 12]\n    common: c1\n    segment: s1\n"
	     "  word:\n"
	     "    text: \"OB8%A\"\n    font: \"Liberation Sans:bold\"\n"
	     "    cap_height: 3\n    position: [12, 10.5]\n"
	     "    common: c1\n    segment: s2\n");
	const struct gp_artwork *art = &b.build->art;
	struct gp_polyset front;
	shapes(art, GP_LAYER_FRONT_ITO, GP_ROLE_ELECTRODE, -1, &front);
	/* ring 1; O 1, B 2, 8 2, % 2, A 1 */
	assert_int_equal(holes(&front), 9);
	char folder[512];
	snprintf(folder, sizeof(folder), "%s/icons-XXXXXX",
		 env("GP_TEST_TMP"));
	assert_non_null(mkdtemp(folder));
	char out[600], gbr[700], png[700];
	snprintf(out, sizeof(out), "%s/out", folder);
	assert_true(gp_build_write(b.build, out, &b.diag));
	snprintf(gbr, sizeof(gbr), "%s/front-ito.gbr", out);
	snprintf(png, sizeof(png), "%s/front.png", folder);

	/* everything on the front plate: electrodes and bridges */
	struct gp_geos *geos = gp_geos_create(NULL);
	struct gp_polyset all, merged;
	shapes(art, GP_LAYER_FRONT_ITO, -1, -1, &all);
	gp_polyset_init(&merged);
	assert_true(gp_geos_union_set(geos, &all, &merged));
	/* one window per electrode part, fine enough that losing its
	 * smallest hole would be far outside the render error */
	for (size_t i = 0; i < front.count; i++)
		check_window(geos, gbr, png, &merged, &front.items[i]);
	gp_polyset_finish(&front);
	gp_polyset_finish(&all);
	gp_polyset_finish(&merged);
	gp_geos_destroy(geos);
	char command[1200];
	snprintf(command, sizeof(command), "rm -rf '%s'", folder);
	assert_int_equal(system(command), 0);
	finish(&b);
}

/* --- parts joined, on each plate -------------------------------------- */

static const char many_parts[] =
	"  units:\n"
	"    text: \"kPa °C %RH\"\n    font: \"Liberation Sans:bold\"\n"
	"    cap_height: 1.4\n    position: [4, 10]\n"
	"    common: c1\n    segment: s1\n"
	"  level:\n"
	"    text: \"LEVEL 80\"\n    font: \"Liberation Serif\"\n"
	"    cap_height: 1.6\n    position: [4, 15]\n    spacing: 0.05\n"
	"    common: c2\n    segment: s1\n"
	"  turned:\n"
	"    text: \"AVA\"\n    font: \"Liberation Sans:bold\"\n"
	"    cap_height: 1.5\n    rotate: 90\n    position: [30, 8]\n"
	"    common: c2\n    segment: s2\n";

static size_t union_count(struct gp_geos *geos, const struct gp_polyset *set)
{
	struct gp_polyset u;
	gp_polyset_init(&u);
	assert_true(gp_geos_union_set(geos, set, &u));
	size_t n = u.count;
	gp_polyset_finish(&u);
	return n;
}

/* Every icon's front electrode and bridges form one piece (one net, one
 * lead-in), and so do its back patch pieces and back bridges. */
static void test_parts_joined(void **state)
{
	struct built b;
	make(&b, "0.1", "", many_parts);
	const struct gp_artwork *art = &b.build->art;
	struct gp_geos *geos = gp_geos_create(NULL);
	for (size_t i = 0; i < b.design->icon_count; i++) {
		const struct gp_pixel *p = icon_pixel(art, i);
		struct gp_polyset letters;
		electrode_of(art, p, &letters);
		assert_true(letters.count >= 3); /* several letters */
		gp_polyset_finish(&letters);
		struct gp_polyset front, back, electrode, under;
		shapes(art, GP_LAYER_FRONT_ITO, -1, p->segment, &front);
		/* icons sharing a segment are joined later, by routing */
		size_t sharing = 0;
		for (size_t j = 0; j < b.design->icon_count; j++)
			sharing += icon_pixel(art, j)->segment == p->segment;
		if (union_count(geos, &front) != sharing)
			fail_msg("icon %s: front in %zu pieces",
				 b.design->icons[i].name,
				 union_count(geos, &front));
		/* back: the patch pieces under this icon plus back bridges */
		shapes(art, GP_LAYER_BACK_ITO, -1, p->common, &back);
		electrode_of(art, p, &electrode);
		struct gp_polyset merged;
		gp_polyset_init(&merged);
		assert_true(gp_geos_union_set(geos, &back, &merged));
		gp_polyset_init(&under);
		struct gp_geos_shape *e =
			gp_geos_shape_from_polyset(geos, &electrode);
		size_t touching = 0;
		for (size_t k = 0; k < merged.count; k++) {
			struct gp_geos_shape *s = gp_geos_shape_from_polygon(
				geos, &merged.items[k]);
			if (gp_geos_shape_overlaps_area(geos, e, s))
				touching++;
			gp_geos_shape_destroy(geos, s);
		}
		if (touching != 1)
			fail_msg("icon %s: its electrode lies over %zu separate "
				 "back pieces", b.design->icons[i].name,
				 touching);
		gp_geos_shape_destroy(geos, e);
		gp_polyset_finish(&front);
		gp_polyset_finish(&back);
		gp_polyset_finish(&electrode);
		gp_polyset_finish(&under);
		gp_polyset_finish(&merged);
	}
	gp_geos_destroy(geos);
	finish(&b);
}

/* --- no ghosts: traces off the other plate under every shift ---------- */

/* Area where a (front) and b (back, moved by dx, dy) overlap, mm^2. */
static double overlap(struct gp_geos *geos, struct gp_geos_shape *a,
		      struct gp_geos_shape *b, int64_t dx, int64_t dy)
{
	struct gp_geos_shape *moved = gp_geos_shape_translate(geos, b, dx, dy);
	struct gp_geos_shape *both = gp_geos_shape_intersection(geos, a, moved);
	if (!both)
		fail_msg("GEOS failed");
	double area = gp_geos_shape_area_mm2(geos, both);
	gp_geos_shape_destroy(geos, moved);
	gp_geos_shape_destroy(geos, both);
	return area;
}

static struct gp_geos_shape *merged_shape(struct gp_geos *geos,
					 const struct gp_polyset *set)
{
	struct gp_polyset merged;
	gp_polyset_init(&merged);
	assert_true(gp_geos_union_set(geos, set, &merged));
	struct gp_geos_shape *s = gp_geos_shape_from_polyset(geos, &merged);
	assert_non_null(s);
	gp_polyset_finish(&merged);
	return s;
}

/* Front traces of the icons (everything of their segment nets that is not
 * an intended electrode) against all back ITO, and back bridges against
 * all front ITO, in the 9 plate positions of +-registration. */
static void add_role(const struct gp_artwork *art, enum gp_layer layer,
		     enum gp_role role, struct gp_polyset *out)
{
	struct gp_polyset more;
	shapes(art, layer, (int)role, -1, &more);
	for (size_t k = 0; k < more.count; k++) {
		assert_true(gp_polyset_take(out, &more.items[k]));
	}
	more.count = 0;
	gp_polyset_finish(&more);
}

/* Only what lies inside box (the seal) counts. */
static void clip(struct gp_geos *geos, struct gp_polyset *set,
		 struct gp_box box)
{
	struct gp_polyset b, out;
	gp_polyset_init(&b);
	gp_polyset_init(&out);
	struct gp_polygon p;
	gp_polygon_init(&p);
	assert_true(gp_polygon_set_box(&p, box));
	assert_true(gp_polyset_take(&b, &p));
	assert_true(gp_geos_intersection(geos, set, &b, &out));
	gp_polyset_finish(set);
	*set = out;
	gp_polyset_finish(&b);
}

static void check_no_ghosts(const struct built *b, int64_t m)
{
	const struct gp_artwork *art = &b->build->art;
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_geos *geos = gp_geos_create(&diag);
	struct gp_polyset back_all, front_all, front_traces, back_bridges;
	shapes(art, GP_LAYER_BACK_ITO, -1, -1, &back_all);
	shapes(art, GP_LAYER_FRONT_ITO, -1, -1, &front_all);
	shapes(art, GP_LAYER_FRONT_ITO, GP_ROLE_BRIDGE, -1, &front_traces);
	add_role(art, GP_LAYER_FRONT_ITO, GP_ROLE_LEAD, &front_traces);
	shapes(art, GP_LAYER_BACK_ITO, GP_ROLE_BRIDGE, -1, &back_bridges);
	add_role(art, GP_LAYER_BACK_ITO, GP_ROLE_LEAD, &back_bridges);
	/* inside the seal: the viewing area and the seal's distance */
	struct gp_box seal = b->design->viewing;
	seal.x0 -= 400000, seal.y0 -= 400000;
	seal.x1 += 400000, seal.y1 += 400000;
	clip(geos, &front_traces, seal);
	clip(geos, &back_bridges, seal);
	struct gp_polyset electrodes;
	shapes(art, GP_LAYER_FRONT_ITO, GP_ROLE_ELECTRODE, -1, &electrodes);
	struct gp_polyset outside, icon_area, far;
	gp_polyset_init(&outside);
	gp_polyset_init(&icon_area);
	gp_polyset_init(&far);
	/* the bridge ends inside letters are the icon area itself */
	assert_true(gp_geos_difference(geos, &front_traces, &electrodes,
				       &outside));
	assert_true(outside.count > 0);
	/* Where a bridge leaves a letter the patch keeps the letter's
	 * margin, so the first margin's length of the bridge lights with
	 * the icon: the icon area is the electrode grown by the margin box.
	 * Beyond it nothing at nominal; under a shift of up to the margin
	 * that spur may reach twice the margin from the letter, and nothing
	 * beyond.  (No patch can both cover the letter under every shift and
	 * stay off a trace that touches it.) */
	struct gp_polyset wide_area, farther;
	gp_polyset_init(&wide_area);
	gp_polyset_init(&farther);
	assert_true(gp_geos_dilate_box(geos, &electrodes, m, m, &icon_area));
	assert_true(gp_geos_difference(geos, &outside, &icon_area, &far));
	assert_true(gp_geos_dilate_box(geos, &electrodes, 2 * m, 2 * m,
				       &wide_area));
	assert_true(gp_geos_difference(geos, &outside, &wide_area, &farther));
	assert_true(back_bridges.count > 0);
	/* hand-made sets may overlap; GEOS wants each as one valid shape */
	struct gp_geos_shape *traces = merged_shape(geos, &far);
	struct gp_geos_shape *traces_far = merged_shape(geos, &farther);
	struct gp_geos_shape *back = merged_shape(geos, &back_all);
	struct gp_geos_shape *bb = merged_shape(geos, &back_bridges);
	struct gp_geos_shape *front = merged_shape(geos, &front_all);
	struct gp_geos_shape *elec = merged_shape(geos, &electrodes);
	for (int k = 0; k < GP_REGISTRATION_SHIFTS; k++) {
		int64_t dx = (k % 3 - 1) * m, dy = (k / 3 - 1) * m;
		double a = overlap(geos, k == 4 ? traces : traces_far, back,
				   dx, dy);
		/* 1e-6 mm^2: slivers of the 1 nm snapping grid */
		if (a > 1e-6)
			fail_msg("front bridges over the back plate: %.3g mm2 "
				 "at shift (%lld, %lld) nm", a, (long long)dx,
				 (long long)dy);
		/* back bridges may pass under their own letters only where
		 * the patch is anyway; against everything else: nothing */
		struct gp_geos_shape *rest =
			gp_geos_shape_difference(geos, front, elec);
		a = overlap(geos, rest, bb, dx, dy);
		gp_geos_shape_destroy(geos, rest);
		if (a > 1e-6)
			fail_msg("back bridges under front traces: %.3g mm2 "
				 "at shift (%lld, %lld) nm", a, (long long)dx,
				 (long long)dy);
	}
	gp_geos_shape_destroy(geos, traces);
	gp_geos_shape_destroy(geos, traces_far);
	gp_geos_shape_destroy(geos, back);
	gp_geos_shape_destroy(geos, bb);
	gp_geos_shape_destroy(geos, front);
	gp_geos_shape_destroy(geos, elec);
	gp_polyset_finish(&back_all);
	gp_polyset_finish(&front_all);
	gp_polyset_finish(&front_traces);
	gp_polyset_finish(&back_bridges);
	gp_polyset_finish(&electrodes);
	gp_polyset_finish(&outside);
	gp_polyset_finish(&icon_area);
	gp_polyset_finish(&far);
	gp_polyset_finish(&wide_area);
	gp_polyset_finish(&farther);
	gp_geos_destroy(geos);
	gp_diag_finish(&diag);
}

static void test_no_ghosts(void **state)
{
	struct built b;
	make(&b, "0.1", block, many_parts);
	check_no_ghosts(&b, 100000);
	finish(&b);
	make(&b, "0.05", block, many_parts);
	check_no_ghosts(&b, 50000);
	finish(&b);
}

/* With a ledge the icons lead their nets out themselves (straight, past
 * everything in the way) and the router carries on from there: every net
 * gets its pad, and no lead lies over the other plate inside the seal but
 * at its own icon. */
static const char routing[] =
	"ledges:\n"
	"  main:\n"
	"    side: bottom\n    plate: front\n"
	"    connection: {method: elastomeric, pitch: 0.1}\n"
	"    pitch: 0.8\n    pad_width: 0.4\n    pad_length: 2\n"
	"    edge_clearance: 0.5\n"
	"leads:\n  width: 0.1\n  space: 0.1\n"
	"seal:\n  width: 1\n  distance: 0.5\n"
	"  fill_port: {side: top, width: 2}\n"
	"transfers:\n  size: 0.3\n  count: 2\n  place: seal\n";

static void test_lead_ins(void **state)
{
	struct built b;
	char icons[2048];
	snprintf(icons, sizeof(icons),
		 "  rec:\n"
		 "    text: REC\n    font: \"Liberation Sans:bold\"\n"
		 "    cap_height: 2\n    position: [9, 17]\n"
		 "    common: status\n    segment: s1\n"
		 "  bell:\n"
		 "    shape: circle\n    diameter: 2\n    position: [21, 18]\n"
		 "    common: status\n    segment: s2\n"
		 "  unit:\n"
		 "    text: \"°C\"\n    font: \"Liberation Sans:bold\"\n"
		 "    cap_height: 2\n    position: [29, 17]\n"
		 "    common: units\n    segment: s3\n"
		 "%s", routing);
	use_routed_base = true;
	make(&b, "0.1", "", icons);
	use_routed_base = false;
	const struct gp_artwork *art = &b.build->art;
	/* every icon net has a pad */
	assert_int_equal(b.build->pin_count, 5);
	for (size_t i = 0; i < b.design->icon_count; i++) {
		const struct gp_pixel *p = icon_pixel(art, i);
		int leads = 0;
		for (size_t k = 0; k < art->shape_count; k++)
			leads += art->shapes[k].role == GP_ROLE_LEAD &&
				 art->shapes[k].net == p->segment;
		assert_true(leads > 0);
	}
	check_no_ghosts(&b, 100000);
	finish(&b);
}

/* --- registration ------------------------------------------------------ */

/* For every icon of a sample: the lit area (electrode over the back ITO of
 * its common, through GEOS) equals the electrode's area at nominal and in
 * the 9 plate positions of +-registration, within 1e-6 mm^2.  And what
 * lights at nominal (front ITO of its segment over back ITO of its
 * common: the pair is unique) is exactly the pixel's region: the
 * electrode and the spurs of its bridges, nothing else. */
static void check_registration(const char *path)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_design *design = gp_design_load(path, NULL, 0, &diag);
	struct gp_build *build = design ? gp_build_create(design, &diag) : NULL;
	if (!build) {
		dump(&diag);
		fail_msg("%s did not build", path);
	}
	const struct gp_artwork *art = &build->art;
	int64_t m = design->rules.registration;
	struct gp_geos *geos = gp_geos_create(NULL);
	assert_true(design->icon_count > 0);
	for (size_t i = 0; i < design->icon_count; i++) {
		const struct gp_pixel *p = icon_pixel(art, i);
		struct gp_polyset front, back, seg, lit, region;
		electrode_of(art, p, &front);
		shapes(art, GP_LAYER_BACK_ITO, -1, p->common, &back);
		struct gp_registration reg;
		assert_true(gp_patch_registration(geos, &front, &back, m, m,
						  &reg));
		for (int k = 0; k < GP_REGISTRATION_SHIFTS; k++)
			if (fabs(reg.front_mm2 - reg.lit_mm2[k]) > 1e-6)
				fail_msg("%s: icon %s lit %.9f of %.9f mm2 at "
					 "shift %d", path,
					 design->icons[i].name, reg.lit_mm2[k],
					 reg.front_mm2, k);
		shapes(art, GP_LAYER_FRONT_ITO, -1, p->segment, &seg);
		gp_polyset_init(&lit);
		struct gp_polyset su, bu;
		gp_polyset_init(&su);
		gp_polyset_init(&bu);
		assert_true(gp_geos_union_set(geos, &seg, &su));
		assert_true(gp_geos_union_set(geos, &back, &bu));
		assert_true(gp_geos_intersection(geos, &su, &bu, &lit));
		region_of(p, &region);
		double lit_mm2, region_mm2;
		assert_true(gp_geos_area_mm2(geos, &lit, &lit_mm2));
		assert_true(gp_geos_area_mm2(geos, &region, &region_mm2));
		if (fabs(lit_mm2 - region_mm2) > 1e-6)
			fail_msg("%s: icon %s lights %.9f mm2, its region is "
				 "%.9f mm2", path, design->icons[i].name,
				 lit_mm2, region_mm2);
		print_message("%s: electrode %.6f mm2, least lit %.6f mm2, "
			      "lit region with spurs %.6f mm2\n",
			      design->icons[i].name, reg.front_mm2,
			      reg.worst_mm2, region_mm2);
		gp_polyset_finish(&front);
		gp_polyset_finish(&back);
		gp_polyset_finish(&seg);
		gp_polyset_finish(&su);
		gp_polyset_finish(&bu);
		gp_polyset_finish(&lit);
		gp_polyset_finish(&region);
	}
	gp_geos_destroy(geos);
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_finish(&diag);
}

static void test_registration_samples(void **state)
{
	check_registration("../samples/tank-logger.yaml");
}

/* With a margin smaller than the shift the loss shows, and it is what
 * the geometry says: a w x h rectangle over a patch grown by m, the back
 * moved by s > m in x and y, keeps (w - (s - m)) x (h - (s - m)). */
static void test_registration_loss_detected(void **state)
{
	struct built b;
	make(&b, "0.05", "",
	     "  frame:\n"
	     "    shape: rectangle\n    size: [4, 2]\n    position: [10, 10]\n"
	     "    common: c1\n    segment: s1\n");
	const struct gp_pixel *p = icon_pixel(&b.build->art, 0);
	struct gp_polyset front, back;
	electrode_of(&b.build->art, p, &front);
	shapes(&b.build->art, GP_LAYER_BACK_ITO, -1, p->common, &back);
	struct gp_geos *geos = gp_geos_create(NULL);
	struct gp_registration reg;
	assert_true(gp_patch_registration(geos, &front, &back, 100000, 100000,
					  &reg));
	double lost = 0.1 - 0.05;
	assert_true(fabs(reg.front_mm2 - 8) < 1e-9);
	assert_true(fabs(reg.worst_mm2 - (4 - lost) * (2 - lost)) < 1e-6);
	assert_true(reg.worst_mm2 < reg.front_mm2 - 0.1);
	/* within the margin nothing is lost */
	assert_true(gp_patch_registration(geos, &front, &back, 50000, 50000,
					  &reg));
	assert_true(fabs(reg.worst_mm2 - 8) < 1e-6);
	gp_geos_destroy(geos);
	gp_polyset_finish(&front);
	gp_polyset_finish(&back);
	finish(&b);
}

/* --- nets and pairs ------------------------------------------------------ */

static void test_nets(void **state)
{
	struct built b;
	make(&b, "0.1", block,
	     "  a:\n"
	     "    shape: circle\n    diameter: 1\n    position: [5, 10]\n"
	     "    common: status\n    segment: x\n"
	     "  b:\n"
	     "    shape: circle\n    diameter: 1\n    position: [8, 10]\n"
	     "    common: { block: main, row: 8 }\n    segment: x\n"
	     "  c:\n"
	     "    shape: circle\n    diameter: 1\n    position: [11, 10]\n"
	     "    common: units\n    segment: y\n"
	     "  d:\n"
	     "    shape: circle\n    diameter: 1\n    position: [14, 10]\n"
	     "    common: status\n    segment: y\n"
	     "  e:\n"
	     "    text: \"°C\"\n    font: \"Liberation Sans:bold\"\n"
	     "    cap_height: 1.2\n    align: right\n    vertical: top\n"
	     "    position: [30, 12]\n    common: units\n    segment: x\n");
	const struct gp_artwork *art = &b.build->art;
	const struct gp_net *nets = art->nets;
	/* block commons COM1..COM8, then icon commons in order of use */
	assert_string_equal(nets[icon_pixel(art, 0)->common].name, "COM9");
	assert_int_equal(icon_pixel(art, 1)->common,
			 gp_block_common_net(b.build, 0, 7));
	assert_string_equal(nets[icon_pixel(art, 1)->common].name, "COM8");
	assert_string_equal(nets[icon_pixel(art, 2)->common].name, "COM10");
	assert_int_equal(icon_pixel(art, 3)->common,
			 icon_pixel(art, 0)->common);
	/* 4 cells x 5 columns = SEG1..SEG20, then the icons' */
	assert_string_equal(nets[icon_pixel(art, 0)->segment].name, "SEG21");
	assert_string_equal(nets[icon_pixel(art, 2)->segment].name, "SEG22");
	assert_int_equal(icon_pixel(art, 4)->segment,
			 icon_pixel(art, 0)->segment);
	assert_int_equal(art->common_count, 10);
	/* right and top of the ink box on the anchor */
	struct gp_box box = icon_pixel(art, 4)->box;
	assert_int_equal(box.x1, 30 * MM);
	assert_int_equal(box.y1, 12 * MM);
	assert_non_null(strstr(gp_build_summary(b.build),
			       "icon e: '°C' in Liberation Sans Bold"));
	assert_non_null(strstr(gp_build_summary(b.build),
			       "curves flattened within 0.001 mm"));
	finish(&b);
}

static void test_duplicate_pairs(void **state)
{
	struct built b;
	assert_false(try_build(&b, "0.1", block,
			       "  a:\n"
			       "    shape: circle\n    diameter: 1\n"
			       "    position: [5, 10]\n"
			       "    common: { block: main, line: 1, row: 3 }\n"
			       "    segment: x\n"
			       "  b:\n"
			       "    shape: circle\n    diameter: 1\n"
			       "    position: [8, 10]\n"
			       "    common: { block: main, row: 3 }\n"
			       "    segment: x\n"));
	expect_message(&b.diag, "icons 'a' (line 28) and 'b' both use the "
				"common of block 'main' line 1 row 3 with "
				"segment 'x'");
	finish(&b);
}

/* --- icons on the commons of digit rows --------------------------------- */

/* Four 7-segment digits without points at 1/4 duty: 7 parts on 4 commons
 * need ceil(7 / 4) = 2 segment lines a digit and leave 2 x 4 - 7 = 1
 * spare (common, line) slot in each (from memory of the trade: designers
 * fill them with annunciators). */
static const char quarter_digits[] =
	"digits:\n"
	"  clock:\n"
	"    origin: [5, 8]\n"
	"    count: 4\n"
	"    pitch: 8\n"
	"    segments: 7\n"
	"    height: 9\n"
	"    width: 4.5\n"
	"    stroke: 0.9\n"
	"    gap: 0.2\n"
	"    duty: 4\n";

static const char static_digits[] =
	"digits:\n"
	"  clock:\n"
	"    origin: [5, 8]\n"
	"    count: 4\n"
	"    pitch: 8\n"
	"    segments: 7\n"
	"    height: 9\n"
	"    width: 4.5\n"
	"    stroke: 0.9\n"
	"    gap: 0.2\n"
	"    duty: 1\n";

static void test_digit_commons(void **state)
{
	struct built b;
	make(&b, "0.05", static_digits,
	     "  a:\n"
	     "    shape: circle\n    diameter: 1\n    position: [6, 19]\n"
	     "    common: COM1\n    segment: x\n"
	     "  b:\n"
	     "    shape: circle\n    diameter: 1\n    position: [10, 19]\n"
	     "    common: { digits: clock, common: 1 }\n    segment: y\n"
	     "  c:\n"
	     "    shape: circle\n    diameter: 1\n    position: [14, 19]\n"
	     "    slot: auto\n");
	const struct gp_artwork *art = &b.build->art;
	/* a static row has one common and no spare slot: every icon is on
	 * COM1, the automatic one with a segment line of its own */
	for (size_t i = 0; i < 3; i++)
		assert_string_equal(art->nets[icon_pixel(art, i)->common].name,
				    "COM1");
	/* 4 digits x 7 segments = SEG1..SEG28, then the icons' */
	assert_string_equal(art->nets[icon_pixel(art, 0)->segment].name,
			    "SEG29");
	assert_string_equal(art->nets[icon_pixel(art, 2)->segment].name,
			    "SEG31");
	/* and the icons add no common: the glass stays static */
	assert_int_equal(b.build->art.common_count, 1);
	finish(&b);
}

/* Does a part of the unit use (common, line)? */
static bool part_uses(const struct gp_digit_unit *u, int common, int line)
{
	for (int p = 0; p < u->part_count; p++)
		if (u->parts[p].common == common && u->parts[p].line == line)
			return true;
	return false;
}

static void test_spare_slots(void **state)
{
	struct built b;
	make(&b, "0.05", quarter_digits,
	     "  up:\n"
	     "    shape: triangle\n    size: [1, 0.8]\n"
	     "    position: [23, 19]\n    slot: auto\n"
	     "  down:\n"
	     "    shape: triangle\n    size: [1, 0.8]\n    rotate: 180\n"
	     "    position: [23, 6.5]\n    slot: auto\n"
	     "  set:\n"
	     "    shape: rectangle\n    size: [1.2, 0.6]\n"
	     "    position: [7, 19]\n"
	     "    common: { digits: clock, common: 4 }\n"
	     "    segment: { digits: clock, digit: 1, line: 2 }\n");
	const struct gp_artwork *art = &b.build->art;
	const struct gp_digit_row *row = &b.build->digit_rows[0];
	assert_int_equal(row->unit_count, 4);
	/* 'set' takes digit 1's spare slot by hand; the automatic icons
	 * take those of the digits nearest them (digit 3 spans x 21..25.5) */
	int seen[4] = { 0 };
	for (size_t i = 0; i < 2; i++) {
		const struct gp_pixel *px = icon_pixel(art, i);
		int common = px->common - row->first_common + 1;
		bool found = false;
		for (size_t u = 0; u < row->unit_count; u++) {
			const struct gp_digit_unit *unit = &row->units[u];
			int line = px->segment - unit->first_line_net + 1;
			if (line < 1 || line > unit->line_count)
				continue;
			assert_int_equal(unit->line_count, 2);
			assert_false(part_uses(unit, common, line));
			seen[u]++;
			found = true;
		}
		assert_true(found);
	}
	/* both are near digit 3; it has one spare slot, so the second
	 * takes a neighbour's */
	assert_int_equal(seen[2], 1);
	assert_int_equal(seen[1] + seen[3], 1);
	assert_non_null(strstr(gp_build_summary(b.build),
			       "spare slot of digit 3 of row 'clock'"));
	finish(&b);
	/* an explicit pair that a segment already uses is refused, with a
	 * spare slot named */
	struct built c;
	assert_false(try_build(&c, "0.05", quarter_digits,
			       "  bad:\n"
			       "    shape: circle\n    diameter: 1\n"
			       "    position: [7, 19]\n"
			       "    common: { digits: clock, common: 1 }\n"
			       "    segment: { digits: clock, digit: 1, "
			       "line: 1 }\n"));
	expect_message(&c.diag, "icon 'bad' uses COM1 x SEG1, which already "
				"lights digits clock digit 1");
	expect_message(&c.diag, "a spare slot is COM");
	finish(&c);
}

static void test_net_references(void **state)
{
	struct built b;
	assert_false(try_build(&b, "0.05", static_digits,
			       "  a:\n"
			       "    shape: circle\n    diameter: 1\n"
			       "    position: [7, 19]\n"
			       "    common: COM2\n    segment: x\n"));
	expect_message(&b.diag, "icon 'a': common 'COM2' is not a net of the "
				"glass (the blocks and digit rows make COM1 "
				"to COM1)");
	finish(&b);
	assert_false(try_build(&b, "0.05", static_digits,
			       "  a:\n"
			       "    shape: circle\n    diameter: 1\n"
			       "    position: [7, 19]\n"
			       "    common: { digits: clok, common: 1 }\n"
			       "    segment: x\n"));
	expect_message(&b.diag, "names digit row 'clok', which is not "
				"described in 'digits'; did you mean 'clock'?");
	finish(&b);
	assert_false(try_build(&b, "0.05", static_digits,
			       "  a:\n"
			       "    shape: circle\n    diameter: 1\n"
			       "    position: [7, 19]\n"
			       "    common: { digits: clock, common: 2 }\n"
			       "    segment: x\n"));
	expect_message(&b.diag, "digit row 'clock' has 1 common(s) (duty "
				"1/1); common 2 is outside");
	finish(&b);
	assert_false(try_build(&b, "0.05", static_digits,
			       "  a:\n"
			       "    shape: circle\n    diameter: 1\n"
			       "    position: [7, 19]\n"
			       "    slot: auto\n    common: COM1\n"));
	expect_message(&b.diag, "give either 'slot: auto' or 'common' and "
				"'segment'");
	finish(&b);
	assert_false(try_build(&b, "0.05", static_digits,
			       "  a:\n"
			       "    shape: circle\n    diameter: 1\n"
			       "    position: [7, 19]\n"
			       "    common: COM1\n"
			       "    segment: { digits: clock, digit: 2, "
			       "line: 8 }\n"));
	expect_message(&b.diag, "digit 2 of row 'clock' has 7 segment line(s); "
				"line 8 is outside");
	finish(&b);
}

/* --- arrays --------------------------------------------------------------- */

static void test_arrays(void **state)
{
	struct built b;
	make(&b, "0.05", "",
	     "  bar:\n"
	     "    shape: rectangle\n    size: [0.2, 1]\n"
	     "    position: [2.5, 8]\n"
	     "    array: {count: 100, pitch: 0.333333}\n"
	     "    common: level\n    segment: bar\n"
	     "  dial:\n"
	     "    shape: rectangle\n    size: [0.5, 1.2]\n"
	     "    position: [30, 18]\n"
	     "    array: {count: 7, centre: [24, 18], angle: 30}\n"
	     "    commons: [a, b, c, d, e, f, g]\n    segment: arc\n");
	const struct gp_design *d = b.design;
	assert_int_equal(d->icon_count, 107);
	/* the span is the datum (DESIGN.md 3): cell k at origin + k x pitch
	 * exactly, so the last of 100 is 99 x 0.333333 = 32.999967 mm on */
	assert_string_equal(d->icons[99].name, "bar100");
	assert_int_equal(d->icons[99].position.x, 2500000 + 99 * 333333);
	assert_int_equal(d->icons[99].position.y, 8 * MM);
	const struct gp_artwork *art = &b.build->art;
	/* each cell its own pixel: one common, 100 segment lines */
	for (size_t i = 1; i < 100; i++) {
		assert_int_equal(icon_pixel(art, i)->common,
				 icon_pixel(art, 0)->common);
		assert_int_not_equal(icon_pixel(art, i)->segment,
				     icon_pixel(art, i - 1)->segment);
	}
	assert_string_equal(art->nets[icon_pixel(art, 99)->segment].name,
			    "SEG100");
	/* on the arc: every cell 6 mm from the centre (within the 1 nm of
	 * rounding), 30 degrees apart, and its pixel turned with it: the
	 * 0.5 x 1.2 mm rectangle keeps its area (0.6 mm^2) */
	for (size_t k = 0; k < 7; k++) {
		const struct gp_icon *c = &d->icons[100 + k];
		double dx = (double)(c->position.x - 24 * MM);
		double dy = (double)(c->position.y - 18 * MM);
		assert_true(fabs(sqrt(dx * dx + dy * dy) - 6e6) <= 1);
		double a = atan2(dy, dx) * 180 / PI;
		/* 1 nm at 6 mm is 1e-5 degrees */
		assert_true(fabs(a - 30.0 * (double)k) < 1e-4 ||
			    fabs(a + 360 - 30.0 * (double)k) < 1e-4);
		assert_true(fabs(pixel_area(icon_pixel(art, 100 + k)) - 0.6) <
			    1e-6);
	}
	/* the cells on the arc share one segment, each on its own common */
	assert_int_equal(icon_pixel(art, 100)->segment,
			 icon_pixel(art, 106)->segment);
	assert_int_not_equal(icon_pixel(art, 100)->common,
			     icon_pixel(art, 106)->common);
	finish(&b);
	assert_false(try_build(&b, "0.05", "",
			       "  bar:\n"
			       "    shape: rectangle\n    size: [0.2, 1]\n"
			       "    position: [2.5, 8]\n"
			       "    array: {count: 3, pitch: 1}\n"
			       "    commons: [a, b]\n    segment: s\n"));
	expect_message(&b.diag, "'commons' of icon 'bar' must list one name "
				"for each of its 3 cells");
	finish(&b);
	assert_false(try_build(&b, "0.05", "",
			       "  bar:\n"
			       "    shape: rectangle\n    size: [0.2, 1]\n"
			       "    position: [2.5, 8]\n"
			       "    array: {count: 3, pitch: 1, direction: 45}\n"
			       "    common: a\n    segment: s\n"));
	expect_message(&b.diag, "'direction' must be 0, 90, 180 or 270");
	finish(&b);
}

/* --- width and space -------------------------------------------------- */

static void add_rect(struct gp_polyset *set, double x0, double y0, double x1,
		     double y1)
{
	struct gp_polygon p;
	gp_polygon_init(&p);
	assert_true(gp_polygon_set_box(&p, gp_box_make(llround(x0 * 1e6),
						       llround(y0 * 1e6),
						       llround(x1 * 1e6),
						       llround(y1 * 1e6))));
	assert_true(gp_polyset_take(set, &p));
}

static void test_thin_parts(void **state)
{
	struct gp_geos *geos = gp_geos_create(NULL);
	struct gp_polyset set, thin;
	/* a 0.02 mm stroke joining two pads is thinner than 0.03 */
	gp_polyset_init(&set);
	add_rect(&set, 0, 0, 1, 1);
	add_rect(&set, 1, 0.49, 3, 0.51);
	add_rect(&set, 3, 0, 4, 1);
	struct gp_polyset merged;
	gp_polyset_init(&merged);
	assert_true(gp_geos_union_set(geos, &set, &merged));
	gp_polyset_init(&thin);
	assert_true(gp_thin_parts(geos, &merged, 30000, &thin));
	assert_int_equal(thin.count, 1);
	struct gp_box box = gp_polygon_bounds(&thin.items[0]);
	assert_true(box.x0 == 1000000 && box.x1 == 3000000);
	gp_polyset_finish(&thin);
	gp_polyset_finish(&set);
	gp_polyset_finish(&merged);
	/* 0.04 mm passes, and so do the sharp corners of a 20 degree wedge
	 * (a corner is not a stroke) */
	gp_polyset_init(&set);
	add_rect(&set, 0, 0, 2, 0.04);
	struct gp_polygon wedge;
	gp_polygon_init(&wedge);
	double tip = 1 / tan(10 * PI / 180);
	assert_true(gp_ring_push(&wedge.outer, 0, 1000000));
	assert_true(gp_ring_push(&wedge.outer, 0, 3000000));
	assert_true(gp_ring_push(&wedge.outer, llround(tip * 1e6), 2000000));
	assert_true(gp_polyset_take(&set, &wedge));
	gp_polyset_init(&thin);
	assert_true(gp_thin_parts(geos, &set, 30000, &thin));
	assert_int_equal(thin.count, 0);
	gp_polyset_finish(&thin);
	gp_polyset_finish(&set);

	/* a slot 0.02 mm wide inside one polygon is narrower than 0.03 */
	struct gp_polygon c;
	gp_polygon_init(&c);
	/* corners in um */
	const int64_t xy[][2] = { { 0, 0 },       { 2000, 0 },
				  { 2000, 980 },  { 1000, 980 },
				  { 1000, 1000 }, { 2000, 1000 },
				  { 2000, 2000 }, { 0, 2000 } };
	for (int i = 0; i < 8; i++)
		assert_true(gp_ring_push(&c.outer, xy[i][0] * 1000,
					 xy[i][1] * 1000));
	gp_polyset_init(&thin);
	assert_true(gp_narrow_gaps(geos, &c, 30000, &thin));
	assert_int_equal(thin.count, 1);
	gp_polyset_finish(&thin);
	gp_polygon_finish(&c);
	gp_geos_destroy(geos);
}

static void test_width_and_space_errors(void **state)
{
	struct built b;
	assert_false(try_build(&b, "0.1", "",
			       "  thin:\n"
			       "    shape: ring\n    diameter: 2\n"
			       "    width: 0.02\n    position: [10, 10]\n"
			       "    common: c\n    segment: s\n"));
	expect_message(&b.diag, "test.yaml:20:5: icon 'thin' at (10, 10) mm: "
				"a stroke near (");
	expect_message(&b.diag, "thinner than min_line 0.03 mm");
	finish(&b);
	assert_false(try_build(&b, "0.1", "",
			       "  tight:\n"
			       "    text: REC\n"
			       "    font: \"Liberation Sans:bold\"\n"
			       "    cap_height: 1.2\n    spacing: -0.13\n"
			       "    position: [10, 10]\n"
			       "    common: c\n    segment: s\n"));
	expect_message(&b.diag, "icon 'tight' at (10, 10) mm: letters ");
	expect_message(&b.diag, "closer than min_space 0.03 mm");
	finish(&b);
}

/* fonts-readme's table: the smallest cap height at which the width check
 * (min_line 0.03 mm) removes no stroke of A-Z, a-z and 0-9, measured with
 * that check on the Liberation fonts (Debian package fonts-liberation2).
 * Just below the stated size a stroke is too thin, at it none is. */
static bool strokes_too_thin(const char *font, const char *cap)
{
	static const char *const texts[] = { "ABCDEFGHIJKLMNOPQRSTUVWXYZ",
					     "abcdefghijklmnopqrstuvwxyz",
					     "0123456789" };
	bool thin = false;
	for (int i = 0; i < 3; i++) {
		char icons[512];
		snprintf(icons, sizeof(icons),
			 "  t:\n    text: %s\n    font: \"%s\"\n"
			 "    cap_height: %s\n    spacing: 0.2\n"
			 "    position: [2, 12]\n"
			 "    common: c\n    segment: s\n",
			 texts[i], font, cap);
		struct built b;
		try_build(&b, "0.1", "", icons);
		thin = thin || has_message(&b.diag, "thinner than min_line");
		finish(&b);
	}
	return thin;
}

static void test_font_table(void **state)
{
	assert_true(strokes_too_thin("Liberation Sans:bold", "0.22"));
	assert_false(strokes_too_thin("Liberation Sans:bold", "0.25"));
	assert_true(strokes_too_thin("Liberation Sans", "0.31"));
	assert_false(strokes_too_thin("Liberation Sans", "0.35"));
	assert_true(strokes_too_thin("Liberation Serif:bold", "0.42"));
	assert_false(strokes_too_thin("Liberation Serif:bold", "0.45"));
	assert_true(strokes_too_thin("Liberation Serif", "0.62"));
	assert_false(strokes_too_thin("Liberation Serif", "0.64"));
}

static void test_bad_descriptions(void **state)
{
	static const struct {
		const char *icons, *message;
	} cases[] = {
		{ "  t:\n    text: A\n    font: \"Liberation Sans\"\n"
		  "    position: [1, 1]\n    common: c\n    segment: s\n",
		  "missing required key 'cap_height' (or 'em_size')" },
		{ "  t:\n    text: A\n    shape: circle\n    diameter: 1\n"
		  "    position: [1, 1]\n    common: c\n    segment: s\n",
		  "give either 'text' or 'shape'" },
		{ "  t:\n    shape: ring\n    diameter: 1\n    width: 0.5\n"
		  "    position: [1, 1]\n    common: c\n    segment: s\n",
		  "'width' must be less than half the 'diameter'" },
		{ "  t:\n    shape: circle\n    diameter: 1\n    rotate: 45\n"
		  "    position: [1, 1]\n    common: c\n    segment: s\n",
		  "'rotate' must be 0, 90, 180 or 270" },
		{ "  t:\n    shape: polygon\n    points: [[0, 0], [1, 0]]\n"
		  "    position: [1, 1]\n    common: c\n    segment: s\n",
		  "'points' must be a list of 3 to" },
		{ "  t:\n    shape: hexagon\n"
		  "    position: [1, 1]\n    common: c\n    segment: s\n",
		  "'shape' value 'hexagon' is not known" },
		{ "  t:\n    shape: circle\n    diameter: 1\n"
		  "    position: [1, 1]\n    common: { block: nowhere, row: 1 }\n"
		  "    segment: s\n",
		  "names block 'nowhere', which is not described" },
		{ "  t:\n    text: A\n    font: \"Liberation Sans\"\n"
		  "    em_size: 2\n    cap_height: 1\n"
		  "    position: [1, 1]\n    common: c\n    segment: s\n",
		  "give either 'cap_height' or 'em_size'" },
		{ "  t:\n    text: \"\"\n    font: \"Liberation Sans\"\n"
		  "    em_size: 2\n"
		  "    position: [1, 1]\n    common: c\n    segment: s\n",
		  "text is empty" },
	};
	for (size_t i = 0; i < sizeof(cases) / sizeof(cases[0]); i++) {
		struct built b;
		assert_false(try_build(&b, "0.1", "", cases[i].icons));
		expect_message(&b.diag, cases[i].message);
		finish(&b);
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_shape_areas),
		cmocka_unit_test(test_holes_read_back_by_gerbv),
		cmocka_unit_test(test_parts_joined),
		cmocka_unit_test(test_no_ghosts),
		cmocka_unit_test(test_lead_ins),
		cmocka_unit_test(test_registration_samples),
		cmocka_unit_test(test_registration_loss_detected),
		cmocka_unit_test(test_nets),
		cmocka_unit_test(test_duplicate_pairs),
		cmocka_unit_test(test_digit_commons),
		cmocka_unit_test(test_spare_slots),
		cmocka_unit_test(test_net_references),
		cmocka_unit_test(test_arrays),
		cmocka_unit_test(test_thin_parts),
		cmocka_unit_test(test_width_and_space_errors),
		cmocka_unit_test(test_font_table),
		cmocka_unit_test(test_bad_descriptions),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
