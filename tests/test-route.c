/* Routing: lead-outs, pads, transfers, seal and pin tables, checked with
 * GEOS (connectivity, spacing, widths, the overlap of the two plates), by
 * compiling the generated header with the system C compiler, and against
 * the pad positions computed here from the description's numbers. */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include "build.h"
#include "maze.h"
#include "gerbv-render.h"
#include "geos.h"
#include "route.h"
#include "route-private.h"
#include "units.h"

#include <dirent.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

struct fixture {
	struct gp_diag diag;
	struct gp_design *design;
	struct gp_build *build;
};

static bool load(struct fixture *f, const char *text)
{
	gp_diag_init(&f->diag);
	f->build = NULL;
	f->design = gp_design_load_buffer("t.yaml", text, strlen(text), NULL,
					  0, &f->diag);
	if (f->design)
		f->build = gp_build_create(f->design, &f->diag);
	return f->build != NULL;
}

static void load_ok(struct fixture *f, const char *text)
{
	if (!load(f, text))
		fail_msg("%s", f->diag.count ? f->diag.entries[0].message
					     : "no message");
}

static void load_file(struct fixture *f, const char *path)
{
	gp_diag_init(&f->diag);
	f->build = NULL;
	f->design = gp_design_load(path, NULL, 0, &f->diag);
	if (f->design)
		f->build = gp_build_create(f->design, &f->diag);
	if (!f->build)
		fail_msg("%s: %s", path,
			 f->diag.count ? f->diag.entries[0].message : "?");
}

static void finish(struct fixture *f)
{
	gp_build_destroy(f->build);
	gp_design_destroy(f->design);
	gp_diag_finish(&f->diag);
}

/* The error text of a failed load, for matching. */
static const char *first_error(const struct fixture *f)
{
	for (size_t i = 0; i < f->diag.count; i++)
		if (f->diag.entries[i].severity == GP_SEVERITY_ERROR)
			return f->diag.entries[i].message;
	return "";
}

static void expect_error(const char *text, const char *needle)
{
	struct fixture f;
	if (load(&f, text))
		fail_msg("expected an error containing \"%s\"", needle);
	const char *message = first_error(&f);
	if (!strstr(message, needle))
		fail_msg("error \"%s\" does not contain \"%s\"", message,
			 needle);
	finish(&f);
}

/* --- the geometry, checked with GEOS ------------------------------------- */

static bool is_ito(const struct gp_shape *s)
{
	return s->layer == GP_LAYER_FRONT_ITO || s->layer == GP_LAYER_BACK_ITO;
}

static void copy_into(struct gp_polyset *set, const struct gp_polygon *p)
{
	struct gp_polygon copy;
	gp_polygon_init(&copy);
	assert_true(gp_polygon_copy(&copy, p));
	assert_true(gp_polyset_take(set, &copy));
}

/* Per net and plate: the union of its ITO shapes. */
struct netgeo {
	struct gp_polyset plate[2];
	struct gp_polyset dots;   /* transfer dots */
	size_t pads;
};

static struct netgeo *net_geometry(struct gp_geos *geos,
				   const struct gp_artwork *art)
{
	struct netgeo *n = calloc(art->net_count, sizeof(*n));
	struct gp_polyset *raw = calloc(art->net_count * 2, sizeof(*raw));
	assert_non_null(n);
	assert_non_null(raw);
	for (size_t i = 0; i < art->net_count; i++) {
		gp_polyset_init(&raw[2 * i]);
		gp_polyset_init(&raw[2 * i + 1]);
		gp_polyset_init(&n[i].plate[0]);
		gp_polyset_init(&n[i].plate[1]);
		gp_polyset_init(&n[i].dots);
	}
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->net < 0)
			continue;
		if (s->layer == GP_LAYER_TRANSFER) {
			copy_into(&n[s->net].dots, &s->poly);
			continue;
		}
		if (!is_ito(s))
			continue;
		int plate = s->layer == GP_LAYER_FRONT_ITO ? 0 : 1;
		copy_into(&raw[2 * s->net + plate], &s->poly);
		n[s->net].pads += s->role == GP_ROLE_PAD;
	}
	for (size_t i = 0; i < art->net_count; i++) {
		for (int p = 0; p < 2; p++) {
			assert_true(gp_geos_union_set(geos, &raw[2 * i + p],
						      &n[i].plate[p]));
			gp_polyset_finish(&raw[2 * i + p]);
		}
	}
	free(raw);
	return n;
}

static void free_net_geometry(struct netgeo *n, size_t count)
{
	for (size_t i = 0; i < count; i++) {
		gp_polyset_finish(&n[i].plate[0]);
		gp_polyset_finish(&n[i].plate[1]);
		gp_polyset_finish(&n[i].dots);
	}
	free(n);
}

static bool polys_meet(struct gp_geos *geos, const struct gp_polygon *a,
		       const struct gp_polygon *b)
{
	struct gp_polyset x, y;
	gp_polyset_init(&x);
	gp_polyset_init(&y);
	copy_into(&x, a);
	copy_into(&y, b);
	double d = 1;
	assert_true(gp_geos_distance(geos, &x, &y, &d));
	gp_polyset_finish(&x);
	gp_polyset_finish(&y);
	return d == 0;
}

static int find(int *parent, int i)
{
	while (parent[i] != i)
		i = parent[i] = parent[parent[i]];
	return i;
}

/* Every net: its pieces on both plates, joined through its transfer dots
 * (a dot joins the pieces it lies on, one on each plate), form one
 * connected whole with exactly one pad. */
static void check_connected(struct gp_geos *geos, const struct gp_artwork *art,
			    const struct netgeo *n, size_t pads)
{
	for (size_t i = 0; i < art->net_count; i++) {
		const struct netgeo *g = &n[i];
		size_t front = g->plate[0].count, total = front + g->plate[1].count;
		if (g->pads != pads)
			fail_msg("%s has %zu pads", art->nets[i].name, g->pads);
		int *parent = malloc((total + 1) * sizeof(int));
		for (size_t k = 0; k < total; k++)
			parent[k] = (int)k;
		for (size_t d = 0; d < g->dots.count; d++) {
			int first = -1;
			for (size_t k = 0; k < total; k++) {
				const struct gp_polygon *p =
					k < front ? &g->plate[0].items[k]
						  : &g->plate[1].items[k - front];
				if (!polys_meet(geos, &g->dots.items[d], p))
					continue;
				if (first < 0)
					first = (int)k;
				else
					parent[find(parent, (int)k)] =
						find(parent, first);
			}
		}
		for (size_t k = 1; k < total; k++)
			if (find(parent, (int)k) != find(parent, 0)) {
				for (size_t q = 0; q < total; q++) {
					struct gp_box bb = gp_polygon_bounds(
						q < front ? &g->plate[0].items[q]
							  : &g->plate[1].items[q - front]);
					print_error("piece %zu: x %.4f..%.4f y %.4f..%.4f\n",
						    q, gp_mm(bb.x0), gp_mm(bb.x1),
						    gp_mm(bb.y0), gp_mm(bb.y1));
				}
				fail_msg("%s is in %zu pieces (front %zu, back "
					 "%zu) not joined by transfers",
					 art->nets[i].name, total, front,
					 g->plate[1].count);
			}
		free(parent);
	}
}

/* No two nets on one plate come closer than min_space (1 nm allowed for
 * the rounding of 45-degree edges to the nanometre grid). */
static void check_spacing(struct gp_geos *geos, const struct gp_artwork *art,
			  const struct netgeo *n, int64_t min_space)
{
	for (int p = 0; p < 2; p++) {
		struct gp_box *boxes = calloc(art->net_count, sizeof(*boxes));
		for (size_t i = 0; i < art->net_count; i++) {
			boxes[i] = gp_box_none();
			for (size_t k = 0; k < n[i].plate[p].count; k++)
				boxes[i] = gp_box_union(
					boxes[i],
					gp_polygon_bounds(&n[i].plate[p].items[k]));
		}
		struct gp_index_pair *pairs = NULL;
		size_t count = 0;
		assert_true(gp_geos_box_pairs(geos, boxes, art->net_count,
					      min_space, &pairs, &count));
		for (size_t k = 0; k < count; k++) {
			size_t a = pairs[k].a, b = pairs[k].b;
			double d;
			assert_true(gp_geos_distance(geos, &n[a].plate[p],
						     &n[b].plate[p], &d));
			if (d < (double)min_space - 1.0)
				fail_msg("%s and %s are %.0f nm apart on the %s "
					 "plate (least %lld)",
					 art->nets[a].name, art->nets[b].name,
					 d, p ? "back" : "front",
					 (long long)min_space);
		}
		free(pairs);
		free(boxes);
	}
}

/* Every lead is at least min_line wide: an opening (erode, then dilate)
 * by just under half the width leaves it as it was (GEOS buffers). */
static void check_widths(struct gp_geos *geos, const struct gp_artwork *art,
			 int64_t min_line)
{
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->role != GP_ROLE_LEAD || !is_ito(s))
			continue;
		struct gp_polyset one, in, back;
		gp_polyset_init(&one);
		gp_polyset_init(&in);
		gp_polyset_init(&back);
		copy_into(&one, &s->poly);
		int64_t h = min_line / 2 - 2;
		assert_true(gp_geos_offset(geos, &one, -h, GP_JOIN_MITRE, 100, &in));
		assert_true(gp_geos_offset(geos, &in, h, GP_JOIN_MITRE, 100, &back));
		double a = gp_polyset_area_mm2(&one), b = gp_polyset_area_mm2(&back);
		if (a - b > 1e-4 * a)
			fail_msg("a lead of %s is narrower than %lld nm somewhere "
				 "(area %.6f, opened %.6f mm2)",
				 art->nets[s->net].name, (long long)min_line, a, b);
		gp_polyset_finish(&one);
		gp_polyset_finish(&in);
		gp_polyset_finish(&back);
	}
}

static struct gp_geos_shape *plate_union(struct gp_geos *geos,
					 const struct gp_artwork *art,
					 enum gp_layer layer)
{
	struct gp_polyset all;
	gp_polyset_init(&all);
	for (size_t i = 0; i < art->shape_count; i++)
		if (art->shapes[i].layer == layer)
			copy_into(&all, &art->shapes[i].poly);
	struct gp_polyset u;
	gp_polyset_init(&u);
	assert_true(gp_geos_union_set(geos, &all, &u));
	struct gp_geos_shape *s = gp_geos_shape_from_polyset(geos, &u);
	gp_polyset_finish(&all);
	gp_polyset_finish(&u);
	assert_non_null(s);
	return s;
}

/* Inside the seal, front and back overlap exactly on the intended pixels
 * (GEOS areas, unsnapped: the difference is below 1e-6 mm^2). */
static void check_overlap(struct gp_geos *geos, const struct gp_build *b)
{
	const struct gp_artwork *art = &b->art;
	struct gp_box in = b->design->viewing, out;
	if (b->design->routing)
		gp_seal_boxes(b->design, &in, &out);
	struct gp_geos_shape *front = plate_union(geos, art, GP_LAYER_FRONT_ITO);
	struct gp_geos_shape *back = plate_union(geos, art, GP_LAYER_BACK_ITO);
	struct gp_geos_shape *inside = gp_geos_shape_from_box(geos, in);
	struct gp_polyset px;
	gp_polyset_init(&px);
	for (size_t i = 0; i < art->pixel_count; i++) {
		const struct gp_pixel *p = &art->pixels[i];
		struct gp_polygon poly;
		gp_polygon_init(&poly);
		if (p->shape.outer.count)
			assert_true(gp_polygon_copy(&poly, &p->shape));
		else
			assert_true(gp_polygon_set_box(&poly, p->box));
		assert_true(gp_polyset_take(&px, &poly));
		/* further parts of the region (letters, spurs) */
		for (size_t k = 0; k < p->more.count; k++)
			copy_into(&px, &p->more.items[k]);
	}
	struct gp_geos_shape *pixels = gp_geos_shape_from_polyset(geos, &px);
	struct gp_geos_shape *shapes[] = { pixels };
	struct gp_geos_shape *pu = gp_geos_shape_union(geos, shapes, 1);
	struct gp_geos_shape *both = gp_geos_shape_intersection(geos, front, back);
	struct gp_geos_shape *lc = gp_geos_shape_intersection(geos, both, inside);
	struct gp_geos_shape *extra = gp_geos_shape_difference(geos, lc, pu);
	struct gp_geos_shape *lost = gp_geos_shape_difference(geos, pu, lc);
	double e = gp_geos_shape_area_mm2(geos, extra);
	double l = gp_geos_shape_area_mm2(geos, lost);
	/* Back patches are snapped to the 1 nm grid (GEOS snap rounding):
	 * where a notch meets a segment's edge the node moves by up to half
	 * a nanometre.  Allow 0.1 nm on average along every pixel edge. */
	double limit = 1e-6;
	for (size_t i = 0; i < px.count; i++) {
		const struct gp_ring *r = &px.items[i].outer;
		for (size_t k = 0; k < r->count; k++) {
			struct gp_point p0 = r->points[k];
			struct gp_point p1 = r->points[(k + 1) % r->count];
			limit += hypot((double)(p1.x - p0.x),
				       (double)(p1.y - p0.y)) / 1e6 * 1e-7;
		}
	}
	if (e >= limit || l >= limit) {
		struct gp_box eb = gp_geos_shape_bounds(extra);
		fail_msg("inside the seal front and back overlap %.9f mm2 "
			 "more and %.9f mm2 less than the pixels (extra in "
			 "x %.3f..%.3f y %.3f..%.3f)",
			 e, l, gp_mm(eb.x0), gp_mm(eb.x1), gp_mm(eb.y0),
			 gp_mm(eb.y1));
	}
	struct gp_geos_shape *all[] = { front, back, inside, pixels, pu, both,
					lc, extra, lost };
	for (size_t i = 0; i < sizeof(all) / sizeof(all[0]); i++)
		gp_geos_shape_destroy(geos, all[i]);
	gp_polyset_finish(&px);
}

/* Pads lie on the ledge (off the other plate), outside the seal. */
static void check_pads(const struct gp_build *b)
{
	const struct gp_design *d = b->design;
	struct gp_box in, out;
	gp_seal_boxes(d, &in, &out);
	for (size_t i = 0; i < b->pin_count; i++) {
		const struct gp_pin *p = &b->pins[i];
		const struct gp_ledge *l = &b->ledges[p->ledge];
		struct gp_box mine = l->plate == GP_PLATE_FRONT ? d->front.box
							       : d->back.box;
		struct gp_box other = l->plate == GP_PLATE_FRONT ? d->back.box
								: d->front.box;
		struct gp_box q = p->box;
		assert_true(q.x0 >= mine.x0 && q.x1 <= mine.x1 &&
			    q.y0 >= mine.y0 && q.y1 <= mine.y1);
		bool off_other = q.x1 <= other.x0 || q.x0 >= other.x1 ||
				 q.y1 <= other.y0 || q.y0 >= other.y1;
		bool off_seal = q.x1 <= out.x0 || q.x0 >= out.x1 ||
				q.y1 <= out.y0 || q.y0 >= out.y1;
		if (!off_other || !off_seal)
			fail_msg("pin %d is not on its ledge outside the seal",
				 p->number);
	}
}

static void check_all(const struct gp_build *b)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_geos *geos = gp_geos_create(&diag);
	const struct gp_artwork *art = &b->art;
	struct netgeo *n = net_geometry(geos, art);
	check_connected(geos, art, n, 1);
	check_spacing(geos, art, n, b->design->rules.min_space);
	check_widths(geos, art, b->design->rules.min_line);
	check_overlap(geos, b);
	check_pads(b);
	free_net_geometry(n, art->net_count);
	gp_geos_destroy(geos);
	assert_int_equal(diag.errors, 0);
	gp_diag_finish(&diag);
}

/* --- descriptions ------------------------------------------------------- */

/* A 2 x 8 character glass: front 50 x 30 with a ledge below, commons
 * brought to it through transfers.  %s: extra lines for 'ledges: main:',
 * %s: more sections. */
static char *glass(const char *ledge, const char *more)
{
	char *text = malloc(8192);
	snprintf(text, 8192,
		 "glass: {part: T-1}\n"
		 "front: {size: [50, 30]}\n"
		 "back: {size: [50, 24], position: [0, 6]}\n"
		 "viewing_area: {position: [6, 10], size: [38, 16]}\n"
		 "rules: {min_line: 0.03, min_space: 0.03, registration: 0.1,"
		 " edge_clearance: 0.4}\n"
		 "blocks:\n"
		 "  m:\n"
		 "    origin: [13.125, 24]\n"
		 "    cells: [8, 2]\n"
		 "    dots: [5, 7]\n"
		 "    dot_size: [0.5, 0.55]\n"
		 "    dot_pitch: [0.55, 0.6]\n"
		 "    cell_pitch: 3\n"
		 "    line_pitch: 6\n"
		 "ledges:\n"
		 "  main:\n"
		 "    side: bottom\n"
		 "%s"
		 "seal: {width: 1.2, distance: 0.6}\n"
		 "%s",
		 ledge, more);
	return text;
}

static void route_sample(void **state)
{
	(void)state;
	DIR *dir = opendir("../samples");
	assert_non_null(dir);
	struct dirent *e;
	int count = 0;
	while ((e = readdir(dir))) {
		size_t len = strlen(e->d_name);
		if (len < 5 || strcmp(e->d_name + len - 5, ".yaml") != 0)
			continue;
		char path[512];
		snprintf(path, sizeof(path), "../samples/%s", e->d_name);
		struct fixture f;
		load_file(&f, path);
		if (f.build->pin_count) {
			check_all(f.build);
			count++;
		}
		finish(&f);
	}
	closedir(dir);
	assert_true(count >= 1);
}

static void route_transfers_seal(void **state)
{
	(void)state;
	char *text = glass("    pitch: 0.5\n    pad_width: 0.25\n", "");
	struct fixture f;
	load_ok(&f, text);
	assert_int_equal(f.build->pin_count, 14 + 40);
	check_all(f.build);
	finish(&f);
	free(text);
}

static void route_transfers_outside(void **state)
{
	(void)state;
	char *text = glass("    pitch: 0.5\n    pad_width: 0.25\n",
			   "transfers: {size: 0.2, count: 3, place: outside}\n"
			   "leads: {commons: left, width: 0.08, space: 0.06}\n");
	struct fixture f;
	load_ok(&f, text);
	check_all(f.build);
	finish(&f);
	free(text);
}

/* Commons to a ledge of their own on the back plate (no transfers),
 * segments to the front ledge. */
static void route_two_ledges(void **state)
{
	(void)state;
	char *text = malloc(4096);
	snprintf(text, 4096,
		 "glass: {part: T-2}\n"
		 "front: {size: [50, 30]}\n"
		 "back: {size: [54, 24], position: [0, 6]}\n"
		 "viewing_area: {position: [6, 10], size: [38, 16]}\n"
		 "blocks:\n"
		 "  m: {origin: [13.125, 24], cells: [8, 2], dots: [5, 7],"
		 " dot_size: [0.5, 0.55], dot_pitch: [0.55, 0.6],"
		 " cell_pitch: 3, line_pitch: 6}\n"
		 "ledges:\n"
		 "  seg: {side: bottom, pitch: 0.5, carries: segments}\n"
		 "  com: {side: right, pitch: 0.6, pad_length: 1.5,"
		 " edge_clearance: 0.3, carries: commons, numbering: up}\n"
		 "seal: {width: 1, distance: 0.5}\n");
	struct fixture f;
	load_ok(&f, text);
	check_all(f.build);
	/* the commons' ledge is on the back plate, numbered after the
	 * segments' ledge, upwards */
	const struct gp_pin *pins = f.build->pins;
	assert_int_equal(pins[40].number, 41);
	assert_int_equal(pins[40].ledge, 1);
	assert_true(pins[41].centre.y > pins[40].centre.y);
	for (size_t i = 0; i < f.build->art.shape_count; i++)
		assert_int_not_equal(f.build->art.shapes[i].layer,
				     GP_LAYER_TRANSFER);
	finish(&f);
	free(text);
}

/* A ledge on the left: everything turned a quarter. */
static void route_left_ledge(void **state)
{
	(void)state;
	const char *text =
		"glass: {part: T-3}\n"
		"front: {size: [40, 36], position: [-6, 0]}\n"
		"back: {size: [34, 36]}\n"
		"viewing_area: {position: [3, 8], size: [28, 20]}\n"
		"blocks:\n"
		"  m: {origin: [5, 25], cells: [4, 2], dots: [5, 7],"
		" dot_size: [0.5, 0.55], dot_pitch: [0.55, 0.6],"
		" cell_pitch: 6, line_pitch: 8}\n"
		"ledges:\n"
		"  main: {side: left, pitch: 0.6, pad_length: 1.5,"
		" edge_clearance: 0.3}\n"
		"seal: {width: 1, distance: 0.5}\n";
	struct fixture f;
	load_ok(&f, text);
	check_all(f.build);
	finish(&f);
}

/* Two blocks one above the other: the upper block's segments cannot go
 * down through the lower block, so they leave at the top and go round. */
static void route_round_the_top(void **state)
{
	(void)state;
	const char *text =
		"glass: {part: T-4}\n"
		"front: {size: [40, 40]}\n"
		"back: {size: [40, 34], position: [0, 6]}\n"
		"viewing_area: {position: [8, 12], size: [24, 20]}\n"
		"blocks:\n"
		"  up: {origin: [12, 30], cells: [2, 1], dots: [5, 7],"
		" dot_size: [0.5, 0.55], dot_pitch: [0.55, 0.6],"
		" cell_pitch: 4}\n"
		"  low: {origin: [12, 20], cells: [2, 1], dots: [5, 7],"
		" dot_size: [0.5, 0.55], dot_pitch: [0.55, 0.6],"
		" cell_pitch: 4}\n"
		"ledges:\n"
		"  main: {side: bottom, pitch: 0.5}\n"
		"seal: {width: 1, distance: 0.5}\n";
	struct fixture f;
	load_ok(&f, text);
	check_all(f.build);
	finish(&f);
}

/* Icons beside a block: their front electrodes and back patches lead out
 * like any electrode, and the patches are notched where a front lead-out
 * leaves them (checked by the overlap rule). */
static void route_icons(void **state)
{
	(void)state;
	const char *text =
		"glass: {part: T-6}\n"
		"front: {size: [50, 27], position: [0, -3]}\n"
		"back: {size: [50, 20], position: [0, 4]}\n"
		"viewing_area: {position: [4, 7], size: [42, 15]}\n"
		"blocks:\n"
		"  r: {origin: [5, 20.5], cells: [6, 1], dots: [5, 8],"
		" dot_size: [0.45, 0.5], dot_pitch: [0.5, 0.55], cell_pitch: 3}\n"
		"icons:\n"
		"  bat: {shape: rectangle, size: [3, 1.5], position: [28, 19],"
		" common: c1, segment: s1}\n"
		"  dot: {shape: circle, diameter: 1.2, position: [34, 19],"
		" common: c2, segment: s2}\n"
		"  tri: {shape: triangle, size: [1.6, 1.2], position: [40, 12],"
		" common: c3, segment: s3}\n"
		"  ring: {shape: ring, diameter: 2, width: 0.4,"
		" position: [28, 12], common: c4, segment: s4}\n"
		"ledges:\n"
		"  main: {side: bottom, pitch: 0.6, pad_width: 0.3,"
		" pad_length: 1.5, edge_clearance: 0.3}\n"
		"seal: {width: 1, distance: 0.2}\n"
		"leads: {width: 0.05, space: 0.05}\n";
	struct fixture f;
	load_ok(&f, text);
	check_all(f.build);
	finish(&f);
}

/* Pixels of a net, to show that a description really splits it. */
static size_t net_pixels(const struct gp_build *b, const char *name)
{
	size_t count = 0;
	for (size_t i = 0; i < b->art.pixel_count; i++) {
		const struct gp_pixel *p = &b->art.pixels[i];
		count += strcmp(b->art.nets[p->common].name, name) == 0 ||
			 strcmp(b->art.nets[p->segment].name, name) == 0;
	}
	return count;
}

/* Nets in several pieces: two icons on one named common (COM9: its back
 * patches are apart), two icons on one segment (SEG31: bat and tri), an
 * icon on a dot-matrix row's common (COM8: its patch is away from the
 * row's strip).  Each must come out as one connected piece per plate with
 * one pad (check_connected), and the joining buses must keep the spacing
 * and the no-overlap rule (check_spacing, check_overlap). */
static void route_split_icons(void **state)
{
	(void)state;
	const char *text =
		"glass: {part: T-7}\n"
		"front: {size: [50, 27], position: [0, -3]}\n"
		"back: {size: [50, 20], position: [0, 4]}\n"
		"viewing_area: {position: [4, 7], size: [42, 15]}\n"
		"blocks:\n"
		"  r: {origin: [5, 20.5], cells: [6, 1], dots: [5, 8],"
		" dot_size: [0.45, 0.5], dot_pitch: [0.5, 0.55], cell_pitch: 3}\n"
		"icons:\n"
		"  bat: {shape: rectangle, size: [3, 1.5], position: [28, 19],"
		" common: c1, segment: s1}\n"
		"  dot: {shape: circle, diameter: 1.2, position: [34, 19],"
		" common: c1, segment: s2}\n"
		"  tri: {shape: triangle, size: [1.6, 1.2], position: [40, 12],"
		" common: c2, segment: s1}\n"
		"  ring: {shape: ring, diameter: 2, width: 0.4,"
		" position: [28, 12], common: {block: r, row: 8}, segment: s3}\n"
		"ledges:\n"
		"  main: {side: bottom, pitch: 0.6, pad_width: 0.3,"
		" pad_length: 1.5, edge_clearance: 0.3}\n"
		"seal: {width: 1, distance: 0.2}\n"
		"leads: {width: 0.05, space: 0.05}\n";
	struct fixture f;
	load_ok(&f, text);
	assert_int_equal(net_pixels(f.build, "COM9"), 2);
	assert_int_equal(net_pixels(f.build, "SEG31"), 2);
	assert_int_equal(net_pixels(f.build, "COM8"), 30 + 1);
	check_all(f.build);
	finish(&f);
}

/* Two icons under a block on one common: the block's columns come down
 * between them, so no bus can join their patches inside the seal. */
static void route_split_unjoinable(void **state)
{
	(void)state;
	expect_error(
		"glass: {part: T-9}\n"
		"front: {size: [50, 27], position: [0, -3]}\n"
		"back: {size: [50, 20], position: [0, 4]}\n"
		"viewing_area: {position: [4, 7], size: [42, 15]}\n"
		"blocks:\n"
		"  r: {origin: [5, 20.5], cells: [6, 1], dots: [5, 8],"
		" dot_size: [0.45, 0.5], dot_pitch: [0.5, 0.55], cell_pitch: 3}\n"
		"icons:\n"
		"  a: {shape: circle, diameter: 1, position: [9.5, 11],"
		" common: c1, segment: s1}\n"
		"  b: {shape: circle, diameter: 1, position: [15.5, 11],"
		" common: c1, segment: s2}\n"
		"ledges:\n"
		"  main: {side: bottom, pitch: 0.6, pad_width: 0.3,"
		" pad_length: 1.5, edge_clearance: 0.3}\n"
		"seal: {width: 1, distance: 0.2}\n"
		"leads: {width: 0.05, space: 0.05}\n",
		"COM9 is in 2 pieces on the back plate and the piece near "
		"(15.5, 11) mm cannot be joined to the one near (9.5, 11) mm");
}

/* A row of digits; %d: duty, %s: more keys of the row, then the ledge
 * side, then the plates and viewing area. */
static char *digit_glass(int duty, const char *more, const char *side,
			 const char *plates)
{
	char *text = malloc(4096);
	snprintf(text, 4096,
		 "glass: {part: T-10, segments_on: front}\n"
		 "%s"
		 "rules: {min_line: 0.03, min_space: 0.03, registration: 0.04}\n"
		 "digits:\n"
		 "  clock:\n"
		 "    origin: [6, 11]\n    count: 4\n    pitch: 9\n"
		 "    segments: 7\n    height: 10\n    width: 5\n"
		 "    stroke: 1\n    gap: 0.2\n    slant: 6\n"
		 "    ends: bevelled\n"
		 "    point: {shape: round, size: 0.9}\n"
		 "    duty: %d\n%s"
		 "ledges:\n"
		 "  main: {side: %s, pitch: 0.6, pad_width: 0.3, pad_length: 2,"
		 " connection: {method: elastomeric, pitch: 0.1}}\n"
		 "leads: {width: 0.03, space: 0.03}\n"
		 "seal: {width: 0.8, distance: 0.4}\n",
		 plates, duty, more, side);
	return text;
}

/* A multiplexed row laid out in lanes (no band layout for 7 segments with
 * a point at 1/2 duty): the lead-ins beside each digit wall the per-digit
 * patches of a common in; the build says so.  At 1/3 duty the row is laid
 * out in bands and routes: 3 lines a digit and 3 commons. */
static void digits_walled_in(void **state)
{
	(void)state;
	const char *plates =
		"front: {size: [46, 26]}\n"
		"back: {size: [46, 21], position: [0, 5]}\n"
		"viewing_area: {position: [3, 8], size: [40, 15]}\n";
	char *text = digit_glass(2, "", "bottom", plates);
	expect_error(text, "digits 'clock': the patches of COM");
	free(text);
	text = digit_glass(3, "", "bottom", plates);
	struct fixture f;
	load_ok(&f, text);
	assert_int_equal(f.build->pin_count, 3 * 4 + 3);
	check_all(f.build);
	finish(&f);
	free(text);
}

/* The 1/4-duty grid with its ledge at the top or on the left: the lines
 * leave the row downward and go round the seal; every net connected to
 * one pad. */
static void digits_ledge_on_top(void **state)
{
	(void)state;
	const char *plates =
		"front: {size: [46, 28]}\n"
		"back: {size: [46, 23]}\n"
		"viewing_area: {position: [3, 5], size: [40, 16.5]}\n";
	char *text = digit_glass(4, "", "top", plates);
	struct fixture f;
	load_ok(&f, text);
	assert_int_equal(f.build->pin_count, 12);
	assert_int_equal(f.build->ledges[0].side, GP_SIDE_TOP);
	check_all(f.build);
	finish(&f);
	free(text);
	/* and on the left, where the commons leave toward it */
	text = digit_glass(4, "", "left",
			   "front: {size: [51, 21], position: [-5, 5]}\n"
			   "back: {size: [46, 21], position: [0, 5]}\n"
			   "viewing_area: {position: [3, 8], size: [40, 15]}\n");
	load_ok(&f, text);
	assert_int_equal(f.build->pin_count, 12);
	check_all(f.build);
	finish(&f);
	free(text);
}

/* The build resolves the ledges (the plate that overhangs, pin 1 under
 * the leads) in its own copies: the design stays as read, so that one
 * design can be built again and give the same. */
static void design_unchanged(void **state)
{
	(void)state;
	const char *text =
		"glass: {part: T-8}\n"
		"front: {size: [50, 30]}\n"
		"back: {size: [54, 24], position: [0, 6]}\n"
		"viewing_area: {position: [6, 10], size: [38, 16]}\n"
		"blocks:\n"
		"  m: {origin: [13.125, 24], cells: [8, 2], dots: [5, 7],"
		" dot_size: [0.5, 0.55], dot_pitch: [0.55, 0.6],"
		" cell_pitch: 3, line_pitch: 6}\n"
		"ledges:\n"
		"  seg: {side: bottom, pitch: 0.5, carries: segments}\n"
		"  com: {side: right, pitch: 0.6, pad_length: 1.5,"
		" edge_clearance: 0.3, carries: commons, numbering: up}\n"
		"seal: {width: 1, distance: 0.5}\n";
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_design *d = gp_design_load_buffer("t.yaml", text,
						    strlen(text), NULL, 0, &diag);
	assert_non_null(d);
	struct gp_routing before = *d->routing;
	for (int round = 0; round < 2; round++) {
		struct gp_build *b = gp_build_create(d, &diag);
		assert_non_null(b);
		assert_memory_equal(&before, d->routing, sizeof(before));
		/* resolved in the build: the back plate overhangs on the
		 * right, and pin 1 of each row was placed */
		assert_int_equal(b->ledge_count, 2);
		assert_int_equal(b->ledges[1].plate, GP_PLATE_BACK);
		assert_int_equal(d->routing->ledges[1].plate, GP_PLATE_FRONT);
		assert_false(d->routing->ledges[0].pin1_given);
		assert_int_equal(d->routing->ledges[0].pin1, 0);
		assert_int_not_equal(b->ledges[0].pin1, 0);
		/* pads hold their ledge's own edge clearance, 0.3 mm on the
		 * right, less than the rules' 0.5 mm: no finding */
		for (size_t i = 0; i < b->checks.count; i++)
			assert_int_not_equal(b->checks.findings[i].rule,
					     GP_CHECK_EDGE);
		gp_build_destroy(b);
	}
	gp_design_destroy(d);
	gp_diag_finish(&diag);
}

/* A ledge laid out for one connection while the ordering spec names
 * another is worth a warning (but builds). */
static void connection_mismatch_warned(void **state)
{
	(void)state;
	char *text = glass("    pitch: 0.5\n    pad_width: 0.25\n"
			   "    connection: {method: elastomeric, pitch: 0.1}\n",
			   "optics: {connection: pins}\n");
	struct fixture f;
	load_ok(&f, text);
	bool warned = false;
	for (size_t i = 0; i < f.diag.count; i++)
		warned |= f.diag.entries[i].severity == GP_SEVERITY_WARNING &&
			  strstr(f.diag.entries[i].message,
				 "ledge 'main' is laid out for connection "
				 "method elastomeric, but 'optics.connection' "
				 "orders pins") != NULL;
	assert_true(warned);
	finish(&f);
	free(text);
	/* the same connection: nothing to say */
	text = glass("    pitch: 0.5\n    pad_width: 0.25\n",
		     "optics: {connection: elastomeric}\n");
	load_ok(&f, text);
	for (size_t i = 0; i < f.diag.count; i++)
		assert_null(strstr(f.diag.entries[i].message, "optics.connection"));
	finish(&f);
	free(text);
}

/* --- pads ----------------------------------------------------------------- */

/* The span is the datum (DESIGN.md section 3): pad k sits at pin1 +
 * k * pitch, so the last of 999 pads is within 1 nm of its ideal place
 * even at a pitch with no short binary form. */
static void pads_pitch_budget(void **state)
{
	(void)state;
	char *text = malloc(4096);
	/* 999 segments at 0.6 mm in one row of 333 cells of 3 dots; their
	 * single common goes to a ledge of its own on the back plate */
	snprintf(text, 4096,
		 "glass: {part: T-5}\n"
		 "front: {size: [630, 30]}\n"
		 "back: {size: [640, 24], position: [0, 6]}\n"
		 "viewing_area: {position: [5, 10], size: [615, 14]}\n"
		 "blocks:\n"
		 "  m: {origin: [10, 20], cells: [333, 1], dots: [3, 1],"
		 " dot_size: [0.5, 2], dot_pitch: [0.6, 2.1],"
		 " cell_pitch: 1.8}\n"
		 "ledges:\n"
		 "  seg: {side: bottom, pitch: 0.600001, pad_width: 0.3,"
		 " pin1: 10.250007, edge_clearance: 0.2, pad_length: 1.5,"
		 " carries: segments}\n"
		 "  com: {side: right, pitch: 1, carries: commons}\n"
		 "seal: {width: 1, distance: 0.5}\n");
	struct fixture f;
	load_ok(&f, text);
	assert_int_equal(f.build->pin_count, 1000);
	/* ideal: 10.250007 mm + 998 x 0.600001 mm = 609.051005 mm, exactly */
	int64_t ideal = 10250007 + INT64_C(998) * 600001;
	const struct gp_pin *last = &f.build->pins[998];
	assert_int_equal(last->number, 999);
	assert_true(llabs(last->centre.x - ideal) <= 1);
	assert_true(llabs(f.build->pins[0].centre.x - 10250007) <= 1);
	check_pads(f.build);
	finish(&f);
	free(text);
}

/* A window narrower than two cells has no grid and no path: the join
 * says the pieces stay apart (once it said "out of memory"). */
static void maze_degenerate_window(void **state)
{
	(void)state;
	struct gp_box thin = gp_box_make(0, 0, 1000000, 1000);
	assert_false(gp_maze_fits(thin, 1000));
	assert_null(gp_maze_create(thin, 1000));
	assert_false(gp_maze_fits(gp_box_none(), 1000));
	struct gp_box fine = gp_box_make(0, 0, 1000000, 2000);
	assert_true(gp_maze_fits(fine, 1000));
	struct gp_maze *m = gp_maze_create(fine, 1000);
	assert_non_null(m);
	gp_maze_destroy(m);
}

/* A lead with a jog shorter than it is wide: its mitred outline folds
 * over itself, which GEOS refuses ("Input geom 0 is invalid: Self-
 * intersection ... difference failed", seen routing the pump sample).
 * The outline must come out valid: GEOS takes it in an overlay, and its
 * area is the lead's (length x width, the 45-degree jog counted along
 * its centre line, within the corner slivers). */
static void path_jog_outline_valid(void **state)
{
	(void)state;
	const struct gp_point p[] = {
		{ 25444628, 22375000 }, { 25444628, 22550000 },
		{ 25426221, 22568407 }, { 25426221, 27500000 },
	};
	struct gp_polygon poly;
	gp_polygon_init(&poly);
	assert_true(gp_route_path_polygon(p, 4, 50000, &poly));
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_geos *geos = gp_geos_create(&diag);
	struct gp_polyset set, merged;
	gp_polyset_init(&set);
	gp_polyset_init(&merged);
	assert_true(gp_polyset_take(&set, &poly));
	assert_true(gp_geos_union_set(geos, &set, &merged));
	assert_int_equal(merged.count, 1);
	assert_int_equal(diag.errors, 0);
	double length = 0.175 + 0.018407 * 1.41421356 + 4.931593;
	double area = gp_polygon_area_mm2(&merged.items[0]);
	assert_true(fabs(area - length * 0.05) < 0.0005);
	gp_polyset_finish(&set);
	gp_polyset_finish(&merged);
	gp_geos_destroy(geos);
	gp_diag_finish(&diag);
}

/* --- errors with numbers --------------------------------------------------- */

static void capacity_ledge_short(void **state)
{
	(void)state;
	/* 54 pads at 1 mm: 54 x (0.5 + 0.5) = 54 mm; the front plate is
	 * 50 mm with 0.4 mm clearance at each end: 50 - 0.8 = 49.2 mm, and
	 * the last pad needs no gap after it: 49.7 mm */
	char *text = glass("    pitch: 1\n    pad_width: 0.5\n", "");
	expect_error(text, "ledge 'main' is too short: 54 pads need 54 x "
			   "(0.5 + 0.5) = 54 mm along the bottom of the "
			   "front plate, but only 49.7 mm is available (49.2 "
			   "mm between the edge clearances and the 0.5 mm "
			   "gap the last pad does not need)");
	/* and what would fit: (54 - 1) x p + 0.5 p <= 49.2 mm gives
	 * p <= 0.9196 mm, to the micrometre 0.919 mm with 0.459 mm pads
	 * (53 x 0.919 + 0.459 = 49.166 mm) */
	expect_error(text, "; it carries COM1-COM14, SEG1-SEG40; a pitch of "
			   "0.919 mm with 0.459 mm pads would fit");
	free(text);
}

/* A ledge too short says which other ledge has room: the segments'
 * ledge at 1.5 mm pitch holds (49.2 - 0.75) / 1.5 + 1 = 33 of its 40
 * pads; the commons' ledge on the right, 24 - 0.8 = 23.2 mm long at
 * 0.6 mm, holds (23.2 - 0.3) / 0.6 + 1 = 39 pads and carries 14. */
static void capacity_other_ledge(void **state)
{
	(void)state;
	expect_error("glass: {part: T-4}\n"
		     "front: {size: [50, 30]}\n"
		     "back: {size: [54, 24], position: [0, 6]}\n"
		     "viewing_area: {position: [6, 10], size: [38, 16]}\n"
		     "rules: {edge_clearance: 0.4}\n"
		     "blocks:\n"
		     "  m: {origin: [13.125, 24], cells: [8, 2], dots: [5, 7],"
		     " dot_size: [0.5, 0.55], dot_pitch: [0.55, 0.6],"
		     " cell_pitch: 3, line_pitch: 6}\n"
		     "ledges:\n"
		     "  seg: {side: bottom, pitch: 1.5, pad_width: 0.75,"
		     " carries: segments}\n"
		     "  com: {side: right, pitch: 0.6, pad_length: 1.5,"
		     " edge_clearance: 0.3, carries: commons, numbering: up}\n"
		     "seal: {width: 1, distance: 0.5}\n",
		     "ledge 'com' has room for 25 more pad(s) (name nets or "
		     "elements in its 'carries')");
}

/* Ledges by element: the pump sample sends the character columns to the
 * front ledge and the commons and the indicators' nets to the back one. */
static void route_carries_lists(void **state)
{
	(void)state;
	struct fixture f;
	load_file(&f, "../samples/pump-line-8x1.yaml");
	check_all(f.build);
	const struct gp_artwork *art = &f.build->art;
	const struct gp_block_nets *block = &f.build->blocks[0];
	size_t front = 0, back = 0;
	for (size_t i = 0; i < f.build->pin_count; i++) {
		const struct gp_pin *p = &f.build->pins[i];
		if (p->net < 0)
			continue;
		bool column = p->net >= block->first_segment &&
			      p->net < block->first_segment +
					       block->segment_count;
		assert_int_equal(p->ledge, column ? 0 : 1);
		front += p->ledge == 0;
		back += p->ledge == 1;
	}
	/* 8 cells x 5 columns; 7 dot rows + 'flags' + 8 indicator lines */
	assert_int_equal(front, 40);
	assert_int_equal(back, 7 + 1 + 8);
	/* every indicator is lit by a pad on the back ledge: pins 41.. */
	size_t icons = 0;
	for (size_t i = 0; i < art->pixel_count; i++)
		if (art->pixels[i].owner_kind == GP_OWNER_ICON) {
			assert_true(art->nets[art->pixels[i].segment].pin > 40);
			assert_true(art->nets[art->pixels[i].common].pin > 40);
			icons++;
		}
	assert_int_equal(icons, 8);
	finish(&f);
	expect_error("glass: {part: T-3}\n"
		     "front: {size: [50, 30]}\n"
		     "back: {size: [50, 24], position: [0, 6]}\n"
		     "viewing_area: {position: [6, 10], size: [38, 16]}\n"
		     "blocks:\n"
		     "  main: {origin: [13.125, 24], cells: [8, 1], dots: [5, 7],"
		     " dot_size: [0.5, 0.55], dot_pitch: [0.55, 0.6],"
		     " cell_pitch: 3}\n"
		     "ledges:\n"
		     "  seg: {side: bottom, pitch: 0.5, carries: [mains, COM1]}\n",
		     "'carries' of ledge 'seg' names 'mains', which is no block, "
		     "digit row, icon, net (COMn, SEGn), commons or segments; did "
		     "you mean 'main'?");
}

static void capacity_tracks(void **state)
{
	(void)state;
	/* 14 commons round the left of the seal: 14 x (0.1 + 0.1) = 2.8 mm;
	 * the seal's outer edge is at x = 6 - 0.6 - 1.2 = 4.2, the edge
	 * clearance ends at 0.4, so 4.2 - 0.4 - 0.1 (space from the seal)
	 * = 3.7 mm... with a wider lead it does not fit */
	char *text = glass("    pitch: 0.5\n    pad_width: 0.25\n",
			   "leads: {commons: left, width: 0.2, space: 0.1}\n");
	expect_error(text, "ledge 'main': 14 leads (COM1 to COM14) pass the "
			   "left of the seal outside it; they need 14 x (0.2 "
			   "+ 0.1) = 4.2 mm but only 3.7 mm is free there");
	/* 3.7 mm / 14 leads = 0.264 mm each, to the micrometre */
	expect_error(text, "leads.width + leads.space of at most 0.264 mm "
			   "would fit, or a ledge on the left could carry "
			   "them");
	free(text);
}

static void capacity_fan_out(void **state)
{
	(void)state;
	/* a ledge far wider than the electrodes: the outer leads move many
	 * millimetres sideways, more than the 4 mm between seal and pads */
	char *text = glass("    pitch: 0.5\n    pad_width: 0.25\n    pin1: 1\n",
			   "");
	expect_error(text, "ledge 'main': to fan out to the pads, ");
	expect_error(text, "must run sideways one above the other between "
			   "the seal and the pads; they need ");
	free(text);
}

static void transfers_too_big(void **state)
{
	(void)state;
	char *text = glass("    pitch: 0.5\n    pad_width: 0.25\n",
			   "transfers: {size: 0.5, count: 2, margin: 0.1}\n");
	/* 2 x (0.5 + 0.1) + 0.1 = 1.3 mm in a 1.2 mm band */
	expect_error(text, "2 transfer dots of 0.5 mm with 0.1 mm margins "
			   "need 1.3 mm across the seal band, which is 1.2 mm "
			   "wide");
	free(text);
}

static void pins_connection_rules(void **state)
{
	(void)state;
	char *text = glass("    pitch: 2\n    connection: {method: pins, pitch: 2.54}\n", "");
	expect_error(text, "pad pitch 2 mm differs from the pin pitch 2.54 mm");
	free(text);
	text = glass("    pitch: 0.5\n    pad_width: 0.15\n"
		     "    connection: {method: elastomeric, pitch: 0.1}\n", "");
	expect_error(text, "pads 0.15 mm wide with 0.35 mm gaps do not suit "
			   "a 0.1 mm conductor pitch");
	free(text);
}

/* --- pin maps ---------------------------------------------------------------- */

/* The automatic order for glass(): commons 1..7 left, segments 1..40,
 * commons 14..8 on the right. */
static void map_text(char *out, size_t size, bool swap)
{
	size_t used = (size_t)snprintf(out, size, "pins:\n  main: [");
	int order[54], n = 0;
	for (int i = 1; i <= 7; i++)
		order[n++] = -i;
	for (int i = 1; i <= 40; i++)
		order[n++] = i;
	for (int i = 14; i >= 8; i--)
		order[n++] = -i;
	if (swap) {
		int t = order[7];   /* SEG1 and SEG2 change places */
		order[7] = order[8];
		order[8] = t;
	}
	for (int i = 0; i < n; i++)
		used += (size_t)snprintf(out + used, size - used, "%s%s%d",
					 i ? ", " : "", order[i] < 0 ? "COM" : "SEG",
					 abs(order[i]));
	snprintf(out + used, size - used, "]\n");
}

static void map_planar_accepted(void **state)
{
	(void)state;
	char map[4096];
	map_text(map, sizeof(map), false);
	char *text = glass("    pitch: 0.5\n    pad_width: 0.25\n", map);
	struct fixture f;
	load_ok(&f, text);
	check_all(f.build);
	assert_int_equal(f.build->art.nets[0].pin, 1);       /* COM1 */
	finish(&f);
	free(text);
}

static void map_crossing_rejected(void **state)
{
	(void)state;
	char map[4096];
	map_text(map, sizeof(map), true);
	char *text = glass("    pitch: 0.5\n    pad_width: 0.25\n", map);
	expect_error(text, "pin map of ledge 'main' makes the leads of SEG1 "
			   "(pin 9) and SEG2 (pin 8) cross: they leave the "
			   "seal in the order SEG1, SEG2 walking round it "
			   "towards the ledge; a routable order from pin 1 "
			   "is: COM1-COM7, SEG1-SEG40, COM14-COM8");
	free(text);
}

static void map_unknown_net(void **state)
{
	(void)state;
	char *text = glass("    pitch: 0.5\n    pad_width: 0.25\n",
			   "pins:\n  main: [COM1, SEG99]\n");
	expect_error(text, "pin map names net 'SEG99', which the glass does "
			   "not have");
	free(text);
}

/* --- tables ---------------------------------------------------------------- */

static char *temporary_folder(void)
{
	char *folder = malloc(512);
	const char *base = getenv("GP_TEST_TMP");
	snprintf(folder, 512, "%s/route-XXXXXX", base ? base : "/tmp");
	assert_non_null(mkdtemp(folder));
	return folder;
}

/* The header compiles with -Wall -Wextra -Werror -pedantic; a program
 * built from it prints, for every net and every dot, what pins.csv says. */
static void header_agrees_with_csv(void **state)
{
	(void)state;
	struct fixture f;
	load_file(&f, "../samples/panel-2x16.yaml");
	char *folder = temporary_folder();
	assert_true(gp_build_write(f.build, folder, &f.diag));
	char path[1024], command[4096];
	snprintf(path, sizeof(path), "%s/probe.c", folder);
	FILE *c = fopen(path, "w");
	assert_non_null(c);
	fprintf(c,
		"#include \"glass-map.h\"\n"
		"#include <stdio.h>\n"
		"int main(void)\n{\n"
		"\tfor (int n = 1; n <= GPX_216_COMMONS; n++)\n"
		"\t\tprintf(\"%%d,COM%%d\\n\", gpx_216_common_pin(n), n);\n"
		"\tfor (int n = 1; n <= GPX_216_SEGMENTS; n++)\n"
		"\t\tprintf(\"%%d,SEG%%d\\n\", gpx_216_segment_pin(n), n);\n"
		"\tstruct gpx_216_drive d;\n"
		"\tlong dots = 0;\n"
		"\tfor (int l = 0; l < 2; l++) for (int k = 0; k < 16; k++)\n"
		"\tfor (int r = 0; r < 8; r++) for (int x = 0; x < 5; x++) {\n"
		"\t\tif (!gpx_216_main_dot(l, k, r, x, &d)) return 1;\n"
		"\t\tif (d.common != l * 8 + r + 1) return 2;\n"
		"\t\tif (d.segment != k * 5 + x + 1) return 3;\n"
		"\t\tif (d.common_pin != gpx_216_common_pin(d.common)) return 4;\n"
		"\t\tdots++;\n\t}\n"
		"\tif (gpx_216_main_dot(2, 0, 0, 0, &d)) return 5;\n"
		"\treturn dots == 1280 ? 0 : 6;\n}\n");
	fclose(c);
	snprintf(command, sizeof(command),
		 "cd '%s' && cc -std=c11 -Wall -Wextra -Werror -pedantic "
		 "-o probe probe.c && ./probe | sort -n > probe.txt && "
		 "tail -n +2 pins.csv | cut -d, -f1,5 | sort -n > csv.txt && "
		 "cmp probe.txt csv.txt",
		 folder);
	assert_int_equal(system(command), 0);
	snprintf(command, sizeof(command), "rm -rf '%s'", folder);
	assert_int_equal(system(command), 0);
	free(folder);
	finish(&f);
}

/* gerbv (Debian package, 2.9) reads every layer of routed glasses without
 * a complaint, and draws something for each. */
static void gerbv_reads_layers(const char *text)
{
	struct fixture f;
	load_ok(&f, text);
	char *folder = temporary_folder();
	assert_true(gp_build_write(f.build, folder, &f.diag));
	static const char *const layers[] = { "front-ito", "back-ito", "seal",
					      "transfer", "front-outline",
					      "back-outline" };
	const struct gp_box fb = f.design->front.box, bb = f.design->back.box;
	struct gerbv_frame frame = {
		gp_mm(fb.x0 < bb.x0 ? fb.x0 : bb.x0) - 1,
		gp_mm(fb.y0 < bb.y0 ? fb.y0 : bb.y0) - 1,
		gp_mm(fb.x1 > bb.x1 ? fb.x1 : bb.x1) + 1,
		gp_mm(fb.y1 > bb.y1 ? fb.y1 : bb.y1) + 1, 400, 2
	};
	/* 400 dpi: gerbv 2.9 draws nothing for a flashed 0.2 mm dot at 200 */
	int seen = 0;
	for (size_t i = 0; i < sizeof(layers) / sizeof(layers[0]); i++) {
		char gbr[1024], png[1024], err[256];
		snprintf(gbr, sizeof(gbr), "%s/%s.gbr", folder, layers[i]);
		snprintf(png, sizeof(png), "%s/%s.png", folder, layers[i]);
		if (access(gbr, R_OK) != 0)
			continue;
		struct gerbv_result result;
		memset(&result, 0, sizeof(result));
		if (!gerbv_render(getenv("GERBV"), gbr, png, &frame, &result,
				  err, sizeof(err)))
			fail_msg("%s: %s", layers[i], err);
		if (result.complaints[0] || !result.any_dark)
			fail_msg("%s: gerbv says \"%s\"%s", layers[i],
				 result.complaints,
				 result.any_dark ? "" : " and drew nothing");
		gerbv_result_finish(&result);
		seen++;
	}
	assert_int_equal(seen, 6);
	char command[1200];
	snprintf(command, sizeof(command), "rm -rf '%s'", folder);
	assert_int_equal(system(command), 0);
	free(folder);
	finish(&f);
}

static void gerbv_reads_routed(void **state)
{
	(void)state;
	char *text = glass("    pitch: 0.5\n    pad_width: 0.25\n",
			   "transfers: {size: 0.2, count: 3, place: outside}\n"
			   "leads: {commons: left, width: 0.08, space: 0.06}\n");
	gerbv_reads_layers(text);
	free(text);
}

/* The benchmark's glass (tests/bench/bench-build.c) at a sixteenth of its
 * size (the GEOS checks of the full one take a minute): 80 segments to a
 * ledge below the front plate, 64 commons to a ledge right of the back
 * plate. */
static void route_bench_glass(void **state)
{
	(void)state;
	const char *text =
		"glass: {part: BENCH}\n"
		"front: {size: [71.2, 69.8]}\n"
		"back: {size: [77.2, 64.8], position: [0, 5]}\n"
		"viewing_area: {position: [5, 10], size: [61.2, 54.8]}\n"
		"blocks:\n"
		"  matrix: {origin: [10, 64.8], cells: [16, 8], dots: [5, 8],"
		" dot_size: [0.5, 0.55], dot_pitch: [0.55, 0.6],"
		" cell_pitch: 3.2, line_pitch: 5.6}\n"
		"ledges:\n"
		"  segments: {side: bottom, pitch: 0.64, pad_width: 0.32,"
		" pad_length: 2, carries: segments}\n"
		"  commons: {side: right, pitch: 0.7, pad_width: 0.35,"
		" pad_length: 2, carries: commons}\n"
		"seal: {width: 1, distance: 0.5}\n";
	struct fixture f;
	load_ok(&f, text);
	assert_int_equal(f.build->pin_count, 80 + 64);
	check_all(f.build);
	finish(&f);
}

/* A header with digit segments and icons compiles cleanly too. */
static void header_with_elements_compiles(void **state)
{
	(void)state;
	FILE *in = fopen("../samples/timer-4digit-static.yaml", "r");
	assert_non_null(in);
	char *text = calloc(1, 65536);
	size_t n = fread(text, 1, 60000, in);
	fclose(in);
	if (!strstr(text, "\nledges:"))
		snprintf(text + n, 65536 - n,
			 "\nledges:\n  main: {side: bottom, pitch: 0.8,"
			 " pad_width: 0.4, pad_length: 1.5, edge_clearance: 0.3}\n"
			 "seal: {width: 0.8, distance: 0.3}\n"
			 "leads: {width: 0.05, space: 0.03}\n");
	struct fixture f;
	load_ok(&f, text);
	free(text);
	char *folder = temporary_folder();
	assert_true(gp_build_write(f.build, folder, &f.diag));
	char command[2048];
	snprintf(command, sizeof(command),
		 "cd '%s' && printf '#include \"glass-map.h\"\\n"
		 "int main(void)\\n{\\n\\tstruct gpx_t4s_drive d;\\n"
		 "\\tstruct gpx_t4s_element e;\\n"
		 "\\treturn gpx_t4s_element(0, &d, &e) && d.common_pin > 0 "
		 "? 0 : 1;\\n}\\n' > probe.c && cc -std=c11 -Wall -Wextra "
		 "-Werror -pedantic -o probe probe.c && ./probe",
		 folder);
	assert_int_equal(system(command), 0);
	snprintf(command, sizeof(command), "rm -rf '%s'", folder);
	assert_int_equal(system(command), 0);
	free(folder);
	finish(&f);
}

static void csv_columns(void **state)
{
	(void)state;
	struct fixture f;
	load_file(&f, "../samples/panel-2x16.yaml");
	struct gp_buffer b;
	gp_buffer_init(&b);
	assert_true(gp_pins_csv(f.build, &b));
	assert_non_null(strstr(b.data, "pin,ledge,x,y,net,role,drives\r\n"));
	assert_non_null(strstr(b.data, ",COM1,common,block main line 1 row 1\r\n"));
	assert_non_null(strstr(b.data, ",SEG6,segment,block main cell 2 column 1\r\n"));
	gp_buffer_finish(&b);
	finish(&f);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(route_sample),
		cmocka_unit_test(route_transfers_seal),
		cmocka_unit_test(route_transfers_outside),
		cmocka_unit_test(route_two_ledges),
		cmocka_unit_test(route_left_ledge),
		cmocka_unit_test(route_round_the_top),
		cmocka_unit_test(route_icons),
		cmocka_unit_test(route_split_icons),
		cmocka_unit_test(route_split_unjoinable),
		cmocka_unit_test(digits_walled_in),
		cmocka_unit_test(digits_ledge_on_top),
		cmocka_unit_test(design_unchanged),
		cmocka_unit_test(connection_mismatch_warned),
		cmocka_unit_test(pads_pitch_budget),
		cmocka_unit_test(maze_degenerate_window),
		cmocka_unit_test(path_jog_outline_valid),
		cmocka_unit_test(capacity_ledge_short),
		cmocka_unit_test(route_carries_lists),
		cmocka_unit_test(capacity_other_ledge),
		cmocka_unit_test(capacity_tracks),
		cmocka_unit_test(capacity_fan_out),
		cmocka_unit_test(transfers_too_big),
		cmocka_unit_test(pins_connection_rules),
		cmocka_unit_test(map_planar_accepted),
		cmocka_unit_test(map_crossing_rejected),
		cmocka_unit_test(map_unknown_net),
		cmocka_unit_test(header_agrees_with_csv),
		cmocka_unit_test(csv_columns),
		cmocka_unit_test(header_with_elements_compiles),
		cmocka_unit_test(route_bench_glass),
		cmocka_unit_test(gerbv_reads_routed),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
