#include "check.h"

#include "array.h"
#include "patch.h"
#include "units.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* --- rules, units, limits ------------------------------------------------ */

static const struct {
	const char *name;
	const char *summary;
} rules[GP_CHECK_RULE_COUNT] = {
	[GP_CHECK_PARASITIC] = { "parasitic-overlap",
				 "electrodes of the two plates overlap inside "
				 "the seal where no pixel is meant" },
	[GP_CHECK_SPACING] = { "plate-spacing",
			       "two nets on one plate closer than the minimum "
			       "space" },
	[GP_CHECK_LINE_WIDTH] = { "line-width",
				  "ITO narrower than the minimum line" },
	[GP_CHECK_REGISTRATION] = { "registration-loss",
				    "a pixel loses lit area when the plates "
				    "are misaligned by the registration "
				    "tolerance" },
	[GP_CHECK_RESISTANCE] = { "lead-resistance",
				  "a net's lead resistance is above the "
				  "limit" },
	[GP_CHECK_SPREAD] = { "resistance-spread",
			      "lead resistances of one kind of net differ "
			      "widely (uneven contrast)" },
	[GP_CHECK_RC] = { "rc-time",
			  "a net's RC time constant is long against the row "
			  "time" },
	[GP_CHECK_CONNECTOR] = { "connector-fit",
				 "a pad or a gap between pads does not suit "
				 "the connector" },
	[GP_CHECK_EDGE] = { "edge-clearance",
			    "ITO closer to the plate edge than the clearance "
			    "or outside the plate" },
	[GP_CHECK_VIEW] = { "pixel-outside-view",
			    "a pixel lies outside the viewing area" },
	[GP_CHECK_SEAL] = { "seal-clearance",
			    "an electrode under the seal, or the viewing area "
			    "not inside the seal" },
	[GP_CHECK_DRIVE] = { "drive-window",
			     "no operating voltage switches the fluid with "
			     "this duty and bias" },
};

const char *gp_check_rule_name(enum gp_check_rule rule)
{
	return rule < GP_CHECK_RULE_COUNT ? rules[rule].name : "?";
}

const char *gp_check_rule_summary(enum gp_check_rule rule)
{
	return rule < GP_CHECK_RULE_COUNT ? rules[rule].summary : "?";
}

const char *gp_check_unit_name(enum gp_check_unit unit)
{
	static const char *const names[] = { "mm", "mm2", "fraction", "ohm",
					     "s", "ratio" };
	return (size_t)unit < sizeof(names) / sizeof(names[0]) ? names[unit]
								: "?";
}

double gp_check_capacitance(double area_mm2, double gap, double permittivity)
{
	return GP_EPSILON_0 * permittivity * area_mm2 * 1e-6 / gap;
}

double gp_check_squares(int64_t length, int64_t w0, int64_t w1)
{
	if (w0 <= 0 || w1 <= 0)
		return INFINITY;
	if (w0 == w1)
		return (double)length / (double)w0;
	/* integral of dx / w(x) with w linear from w0 to w1 */
	return (double)length * log((double)w1 / (double)w0) /
	       (double)(w1 - w0);
}

/* --- report -------------------------------------------------------------- */

void gp_check_report_init(struct gp_check_report *report)
{
	memset(report, 0, sizeof(*report));
	gp_buffer_init(&report->notes);
}

void gp_check_report_finish(struct gp_check_report *report)
{
	free(report->findings);
	free(report->nets);
	gp_buffer_finish(&report->notes);
	gp_check_report_init(report);
}

/* --- the artwork as the checks see it ----------------------------------- */

struct item {
	size_t shape;
	struct gp_box box;
	bool rect;               /* the polygon is exactly its box */
	enum gp_plate plate;
	struct gp_geos_shape *g; /* made on demand */
};

/* Intended pixels sorted by (back net, front net, index): the pixels of
 * one back net lie together, so the lookups made while walking one back
 * shape stay in cache. */
struct pair_entry {
	int front;
	size_t pixel;
};

/* Findings are merged per (rule, nets, pixel, shape without net). */
struct slot {
	uint64_t key[2];
	size_t finding;          /* + 1; 0 is empty */
};

struct checker {
	struct gp_geos *geos;
	const struct gp_artwork *art;
	const struct gp_check_limits *lim;
	struct gp_check_report *rep;
	struct gp_diag *diag;
	struct item *items;
	size_t item_count;
	/* items of each net, by net index (CSR) */
	size_t *net_first;
	size_t *net_items;
	/* intended pixels by (front net, back net) */
	struct pair_entry *pairs;
	size_t *back_first;      /* pairs of back net n: [back_first[n],
				  * back_first[n + 1]) */
	size_t *pair_next;       /* pixel + 1 of the next with that pair */
	/* inside of the seal (or its stand-in) */
	struct gp_geos_shape *inside;
	struct gp_box inside_box;
	bool inside_is_box;
	bool has_seal;
	/* merging findings */
	struct slot *slots;
	size_t slot_mask;
	bool failed;
};

static bool oom(struct checker *c)
{
	c->failed = true;
	return gp_diag_oom(c->diag, NULL);
}

static bool is_ito(enum gp_layer layer)
{
	return layer == GP_LAYER_FRONT_ITO || layer == GP_LAYER_BACK_ITO;
}

static bool polygon_is_box(const struct gp_polygon *p, struct gp_box box)
{
	if (p->hole_count || p->outer.count != 4)
		return false;
	for (size_t i = 0; i < 4; i++) {
		struct gp_point a = p->outer.points[i];
		struct gp_point b = p->outer.points[(i + 1) % 4];
		if ((a.x != box.x0 && a.x != box.x1) ||
		    (a.y != box.y0 && a.y != box.y1) ||
		    (a.x != b.x && a.y != b.y))
			return false;
	}
	return box.x0 < box.x1 && box.y0 < box.y1;
}

static uint64_t mix(uint64_t a, uint64_t b)
{
	uint64_t h = a * UINT64_C(0x9E3779B97F4A7C15) ^ (b + (a << 6));
	h ^= h >> 29;
	h *= UINT64_C(0xBF58476D1CE4E5B9);
	return h ^ (h >> 32);
}

static size_t table_size(size_t n)
{
	size_t size = 64;
	while (size < 2 * n)
		size *= 2;
	return size;
}

static bool collect_items(struct checker *c)
{
	const struct gp_artwork *art = c->art;
	c->items = calloc(art->shape_count ? art->shape_count : 1,
			  sizeof(*c->items));
	c->net_first = calloc(art->net_count + 2, sizeof(*c->net_first));
	if (!c->items || !c->net_first)
		return oom(c);
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (!is_ito(s->layer) || s->open_path ||
		    s->poly.outer.count < 3)
			continue;
		struct item *it = &c->items[c->item_count++];
		it->shape = i;
		it->box = gp_polygon_bounds(&s->poly);
		it->rect = polygon_is_box(&s->poly, it->box);
		it->plate = s->layer == GP_LAYER_FRONT_ITO ? GP_PLATE_FRONT
							   : GP_PLATE_BACK;
		if (s->net >= 0 && (size_t)s->net < art->net_count)
			c->net_first[s->net + 1]++;
	}
	for (size_t n = 0; n < art->net_count; n++)
		c->net_first[n + 1] += c->net_first[n];
	c->net_items = calloc(c->net_first[art->net_count] + 1,
			      sizeof(*c->net_items));
	size_t *fill = calloc(art->net_count + 1, sizeof(*fill));
	if (!c->net_items || !fill) {
		free(fill);
		return oom(c);
	}
	for (size_t k = 0; k < c->item_count; k++) {
		int net = art->shapes[c->items[k].shape].net;
		if (net >= 0 && (size_t)net < art->net_count)
			c->net_items[c->net_first[net] + fill[net]++] = k;
	}
	free(fill);
	return true;
}

static struct gp_geos_shape *item_shape(struct checker *c, struct item *it)
{
	if (!it->g) {
		it->g = gp_geos_shape_from_polygon(
			c->geos, &c->art->shapes[it->shape].poly);
		if (!it->g)
			c->failed = true;
	}
	return it->g;
}

/* Front and back net of a pixel; false when both are on one plate. */
static bool pixel_nets(const struct gp_artwork *art, const struct gp_pixel *p,
		       int *front, int *back)
{
	if (p->common < 0 || p->segment < 0 ||
	    (size_t)p->common >= art->net_count ||
	    (size_t)p->segment >= art->net_count)
		return false;
	enum gp_plate pc = art->nets[p->common].plate;
	enum gp_plate ps = art->nets[p->segment].plate;
	if (pc == ps)
		return false;
	*front = pc == GP_PLATE_FRONT ? p->common : p->segment;
	*back = pc == GP_PLATE_FRONT ? p->segment : p->common;
	return true;
}

/* Two stable counting sorts: by front net, then by back net. */
static bool index_pixels(struct checker *c)
{
	const struct gp_artwork *art = c->art;
	size_t n = art->pixel_count, nets = art->net_count;
	size_t *count = calloc(nets + 2, sizeof(*count));
	size_t *order = calloc(n + 1, sizeof(*order));
	int *front = calloc(n + 1, sizeof(*front));
	int *back = calloc(n + 1, sizeof(*back));
	c->pairs = calloc(n + 1, sizeof(*c->pairs));
	c->back_first = calloc(nets + 2, sizeof(*c->back_first));
	c->pair_next = calloc(n + 1, sizeof(*c->pair_next));
	bool ok = count && order && front && back && c->pairs &&
		  c->back_first && c->pair_next;
	size_t used = 0;
	for (size_t i = 0; ok && i < n; i++) {
		if (!pixel_nets(art, &art->pixels[i], &front[i], &back[i]))
			front[i] = back[i] = -1;
		else
			count[front[i] + 1]++, used++;
	}
	for (size_t k = 0; ok && k < nets; k++)
		count[k + 1] += count[k];
	for (size_t i = 0; ok && i < n; i++)
		if (front[i] >= 0)
			order[count[front[i]]++] = i;
	for (size_t i = 0; ok && i < used; i++)
		c->back_first[back[order[i]] + 1]++;
	for (size_t k = 0; ok && k < nets; k++)
		c->back_first[k + 1] += c->back_first[k];
	memcpy(count, c->back_first, ok ? (nets + 1) * sizeof(*count) : 0);
	for (size_t i = 0; ok && i < used; i++) {
		size_t p = order[i];
		c->pairs[count[back[p]]++] = (struct pair_entry){ front[p], p };
	}
	for (size_t i = 0; ok && i + 1 < used; i++) {
		const struct pair_entry *e = &c->pairs[i], *f = e + 1;
		if (e->front == f->front && back[e->pixel] == back[f->pixel])
			c->pair_next[e->pixel] = f->pixel + 1;
	}
	free(count);
	free(order);
	free(front);
	free(back);
	return ok || oom(c);
}

/* First pixel (+ 1) of the pair, 0 if none; follow pair_next. */
static size_t pair_first(struct checker *c, int front, int back)
{
	size_t lo = c->back_first[back], hi = c->back_first[back + 1];
	while (lo < hi) {
		size_t mid = lo + (hi - lo) / 2;
		if (c->pairs[mid].front < front)
			lo = mid + 1;
		else
			hi = mid;
	}
	return lo < c->back_first[back + 1] && c->pairs[lo].front == front
		       ? c->pairs[lo].pixel + 1
		       : 0;
}

/* --- findings ------------------------------------------------------------ */

static bool bigger_is_worse(enum gp_check_rule rule)
{
	return rule == GP_CHECK_PARASITIC || rule == GP_CHECK_REGISTRATION ||
	       rule == GP_CHECK_RESISTANCE || rule == GP_CHECK_SPREAD ||
	       rule == GP_CHECK_RC || rule == GP_CHECK_VIEW;
}

static bool grow_findings(struct checker *c)
{
	struct gp_check_report *r = c->rep;
	return gp_array_reserve(r->findings, r->capacity, r->count + 1) ||
	       oom(c);
}

bool gp_check_report_add(struct gp_check_report *r,
			 const struct gp_finding *f)
{
	if (!gp_array_reserve(r->findings, r->capacity, r->count + 1))
		return false;
	r->findings[r->count++] = *f;
	if (f->severity == GP_SEVERITY_ERROR)
		r->errors++;
	else if (f->severity == GP_SEVERITY_WARNING)
		r->warnings++;
	return true;
}

static bool grow_slots(struct checker *c)
{
	size_t needed = table_size(c->rep->count + 1);
	if (c->slots && needed <= c->slot_mask + 1)
		return true;
	struct slot *slots = calloc(needed, sizeof(*slots));
	if (!slots)
		return oom(c);
	for (size_t i = 0; c->slots && i <= c->slot_mask; i++) {
		if (!c->slots[i].finding)
			continue;
		size_t h = (size_t)mix(c->slots[i].key[0], c->slots[i].key[1]) &
			   (needed - 1);
		while (slots[h].finding)
			h = (h + 1) & (needed - 1);
		slots[h] = c->slots[i];
	}
	free(c->slots);
	c->slots = slots;
	c->slot_mask = needed - 1;
	return true;
}

/* Adds f, or merges it into the finding with the same rule, nets, pixel
 * and (for shapes without a net) shape: parasitic areas add up, other
 * values keep the worst. */
static void add_finding(struct checker *c, const struct gp_finding *f)
{
	if (c->failed || !grow_slots(c))
		return;
	uint64_t k0 = ((uint64_t)f->rule << 56) ^
		      ((uint64_t)(uint32_t)f->nets[0] << 24) ^
		      (uint64_t)(uint32_t)f->nets[1];
	uint64_t k1 = ((uint64_t)(uint32_t)f->pixel << 32) ^
		      (uint64_t)(uint32_t)(f->nets[0] < 0 ? f->shape : -1);
	size_t h = (size_t)mix(k0, k1) & c->slot_mask;
	for (; c->slots[h].finding; h = (h + 1) & c->slot_mask) {
		if (c->slots[h].key[0] != k0 || c->slots[h].key[1] != k1)
			continue;
		struct gp_finding *old = &c->rep->findings[c->slots[h].finding -
							   1];
		if (f->rule == GP_CHECK_PARASITIC) {
			if (f->value > old->value / 2) /* place of the biggest */
				old->place = f->place;
			old->value += f->value;
		} else if (bigger_is_worse(f->rule) ? f->value > old->value
						    : f->value < old->value) {
			*old = *f;
		}
		return;
	}
	if (!grow_findings(c))
		return;
	c->rep->findings[c->rep->count++] = *f;
	c->slots[h] = (struct slot){ { k0, k1 }, c->rep->count };
}

static struct gp_finding finding(enum gp_check_rule rule,
				 enum gp_severity severity, int net_a,
				 int net_b, struct gp_point place, double value,
				 double limit, enum gp_check_unit unit)
{
	struct gp_finding f;
	memset(&f, 0, sizeof(f));
	f.rule = rule;
	f.severity = severity;
	f.nets[0] = net_a;
	f.nets[1] = net_b;
	f.place = place;
	f.value = value;
	f.limit = limit;
	f.unit = unit;
	f.pixel = -1;
	f.shape = -1;
	return f;
}

/* --- the inside of the seal --------------------------------------------- */

/* Inside = the holes of the seal shapes; without a seal the viewing area
 * stands in (said in the notes); without either, everything. */
static bool find_inside(struct checker *c)
{
	struct gp_polyset holes;
	gp_polyset_init(&holes);
	for (size_t i = 0; i < c->art->shape_count; i++) {
		const struct gp_shape *s = &c->art->shapes[i];
		if (s->layer != GP_LAYER_SEAL || s->role != GP_ROLE_SEAL)
			continue;
		c->has_seal = true;
		for (size_t h = 0; h < s->poly.hole_count; h++) {
			struct gp_polygon p;
			gp_polygon_init(&p);
			if (!gp_ring_copy(&p.outer, &s->poly.holes[h]) ||
			    !gp_polyset_take(&holes, &p)) {
				gp_polygon_finish(&p);
				gp_polyset_finish(&holes);
				return oom(c);
			}
		}
	}
	if (holes.count > 0) {
		c->inside = gp_geos_shape_from_polyset(c->geos, &holes);
		gp_polyset_finish(&holes);
		if (!c->inside)
			return c->failed = true, false;
		c->inside_box = gp_geos_shape_bounds(c->inside);
		gp_buffer_puts(&c->rep->notes,
			       "parasitic overlaps: inside the seal\n");
		return true;
	}
	gp_polyset_finish(&holes);
	c->inside_is_box = true;
	if (c->has_seal && !gp_box_is_empty(c->lim->seal_inside)) {
		c->inside_box = c->lim->seal_inside;
		gp_buffer_puts(&c->rep->notes,
			       "parasitic overlaps: inside the seal's inner "
			       "edge\n");
	} else if (!gp_box_is_empty(c->lim->viewing)) {
		c->inside_box = c->lim->viewing;
		gp_buffer_puts(&c->rep->notes,
			       c->has_seal
				       ? "parasitic overlaps: the seal has no "
					 "inner edge; the viewing area stands "
					 "in for the inside of the seal\n"
				       : "parasitic overlaps: no seal in the "
					 "artwork yet; the viewing area stands "
					 "in for the inside of the seal\n");
	} else {
		c->inside_box = (struct gp_box){ INT64_MIN / 4, INT64_MIN / 4,
						 INT64_MAX / 4, INT64_MAX / 4 };
		gp_buffer_puts(&c->rep->notes,
			       "parasitic overlaps: no seal and no viewing "
			       "area; checked everywhere\n");
	}
	c->inside = NULL;
	return true;
}

/* --- parasitic overlap -------------------------------------------------- */

static bool copy_take(struct gp_polyset *set, const struct gp_polygon *p)
{
	struct gp_polygon copy;
	if (!gp_polygon_copy(&copy, p))
		return false;
	if (gp_polyset_take(set, &copy))
		return true;
	gp_polygon_finish(&copy);
	return false;
}

/* The intended lit region of a pixel (shape and its further parts, or
 * the box) appended to set. */
static bool pixel_region(const struct gp_pixel *px, struct gp_polyset *set)
{
	if (px->shape.outer.count < 3) {
		struct gp_polygon poly;
		gp_polygon_init(&poly);
		bool ok = gp_polygon_set_box(&poly, px->box) &&
			  gp_polyset_take(set, &poly);
		gp_polygon_finish(&poly);
		return ok;
	}
	if (!copy_take(set, &px->shape))
		return false;
	for (size_t i = 0; i < px->more.count; i++)
		if (!copy_take(set, &px->more.items[i]))
			return false;
	return true;
}

/* The intended lit region of every pixel of the pair, as one shape. */
static struct gp_geos_shape *pair_region(struct checker *c, size_t first)
{
	struct gp_polyset set;
	gp_polyset_init(&set);
	for (size_t p = first; p; p = c->pair_next[p - 1]) {
		if (!pixel_region(&c->art->pixels[p - 1], &set)) {
			gp_polyset_finish(&set);
			oom(c);
			return NULL;
		}
	}
	struct gp_geos_shape *s = gp_geos_shape_from_polyset(c->geos, &set);
	gp_polyset_finish(&set);
	return s;
}

/* Fast answer for two rectangles: true when settled (no overlap inside,
 * or it is all inside one plain pixel box of the pair). */
static bool rect_overlap_settled(struct checker *c, const struct item *f,
				 const struct item *b, size_t first)
{
	if (!f->rect || !b->rect || !c->inside_is_box)
		return false;
	struct gp_box m = gp_box_meet(gp_box_meet(f->box, b->box), c->inside_box);
	if (!gp_box_has_area(m))
		return true;
	for (size_t p = first; p; p = c->pair_next[p - 1]) {
		const struct gp_pixel *px = &c->art->pixels[p - 1];
		if (px->shape.outer.count < 3 && gp_box_inside(m, px->box))
			return true;
	}
	return false;
}

static struct gp_geos_shape *clip_inside(struct checker *c,
					 struct gp_geos_shape *s)
{
	struct gp_geos_shape *inside = c->inside;
	struct gp_geos_shape *box = NULL;
	if (!inside) {
		box = gp_geos_shape_from_box(c->geos, c->inside_box);
		inside = box;
	}
	struct gp_geos_shape *r =
		inside ? gp_geos_shape_intersection(c->geos, s, inside) : NULL;
	gp_geos_shape_destroy(c->geos, box);
	return r;
}

static void overlap_pair(struct checker *c, struct item *f, struct item *b)
{
	int fnet = c->art->shapes[f->shape].net;
	int bnet = c->art->shapes[b->shape].net;
	size_t first = pair_first(c, fnet, bnet);
	if (rect_overlap_settled(c, f, b, first))
		return;
	struct gp_geos_shape *gf = item_shape(c, f), *gb = item_shape(c, b);
	if (!gf || !gb || !gp_geos_shape_overlaps_area(c->geos, gb, gf))
		return;
	struct gp_geos_shape *meet = gp_geos_shape_intersection(c->geos, gb,
								gf);
	struct gp_geos_shape *in = meet ? clip_inside(c, meet) : NULL;
	struct gp_geos_shape *meant = first ? pair_region(c, first) : NULL;
	struct gp_geos_shape *rest =
		in && meant ? gp_geos_shape_difference(c->geos, in, meant)
			    : NULL;
	struct gp_geos_shape *left = rest ? rest : (first ? NULL : in);
	if (!left) {
		c->failed = true;
	} else {
		double area = gp_geos_shape_area_mm2(c->geos, left);
		if (area > c->lim->min_overlap_mm2) {
			struct gp_finding fd = finding(
				GP_CHECK_PARASITIC, GP_SEVERITY_ERROR, bnet,
				fnet, gp_box_centre(gp_geos_shape_bounds(left)),
				area, 0, GP_UNIT_MM2);
			fd.shape = (int)f->shape;
			add_finding(c, &fd);
		}
	}
	gp_geos_shape_destroy(c->geos, meet);
	gp_geos_shape_destroy(c->geos, in);
	gp_geos_shape_destroy(c->geos, meant);
	gp_geos_shape_destroy(c->geos, rest);
}

struct query {
	size_t *found;
	size_t count, capacity;
	bool failed;
};

static void on_found(void *user, size_t item)
{
	struct query *q = user;
	if (!gp_array_reserve(q->found, q->capacity, q->count + 1)) {
		q->failed = true;
		return;
	}
	q->found[q->count++] = item;
}

static bool check_parasitic(struct checker *c)
{
	struct gp_geos_index *index = gp_geos_index_create(c->geos);
	struct query q = { 0 };
	if (!index)
		return oom(c);
	for (size_t k = 0; k < c->item_count; k++) {
		const struct item *it = &c->items[k];
		if (it->plate == GP_PLATE_FRONT &&
		    c->art->shapes[it->shape].net >= 0 &&
		    !gp_geos_index_add(index, it->box, k))
			c->failed = true;
	}
	for (size_t k = 0; k < c->item_count && !c->failed; k++) {
		struct item *b = &c->items[k];
		int bnet = c->art->shapes[b->shape].net;
		if (b->plate != GP_PLATE_BACK || bnet < 0)
			continue;
		struct gp_box where = gp_box_meet(b->box, c->inside_box);
		if (!gp_box_has_area(where))
			continue;
		q.count = 0;
		if (!gp_geos_index_query(index, where, on_found, &q) ||
		    q.failed) {
			c->failed = true;
			break;
		}
		/* the tree answers in a fixed order: results stay
		 * reproducible without sorting */
		for (size_t i = 0; i < q.count && !c->failed; i++) {
			struct item *f = &c->items[q.found[i]];
			if (c->art->shapes[f->shape].net != bnet)
				overlap_pair(c, f, b);
		}
	}
	free(q.found);
	gp_geos_index_destroy(index);
	return !c->failed;
}

/* --- spacing on one plate ----------------------------------------------- */

/* Exact distance and nearest points of two boxes. */
static double box_distance(struct gp_box a, struct gp_box b,
			   struct gp_point *mid)
{
	int64_t dx = 0, dy = 0, x, y;
	if (a.x1 < b.x0)
		dx = b.x0 - a.x1, x = a.x1 + dx / 2;
	else if (b.x1 < a.x0)
		dx = a.x0 - b.x1, x = b.x1 + dx / 2;
	else
		x = ((a.x0 > b.x0 ? a.x0 : b.x0) + (a.x1 < b.x1 ? a.x1 : b.x1)) /
		    2;
	if (a.y1 < b.y0)
		dy = b.y0 - a.y1, y = a.y1 + dy / 2;
	else if (b.y1 < a.y0)
		dy = a.y0 - b.y1, y = b.y1 + dy / 2;
	else
		y = ((a.y0 > b.y0 ? a.y0 : b.y0) + (a.y1 < b.y1 ? a.y1 : b.y1)) /
		    2;
	*mid = (struct gp_point){ x, y };
	return hypot((double)dx, (double)dy);
}

/* Coordinates are snapped to 1 nm: a slanted edge drawn exactly at a
 * limit may come out up to a nanometre short of it.  Measures within
 * this of their limit pass. */
#define SNAP_SLACK 1.0
/* Two shapes laid out exactly the minimum space apart (the digit layout's
 * lead-ins side by side in a gap) are both snapped, and a mitred line's
 * offset corners are rounded once more: their facing edges come out up to
 * 2.2 nm closer (measured on a static 14-segment row with gap 0.15).  A
 * space within this of its limit passes; the digit layout allows the same
 * (digits-layout.c, check_spacing). */
#define SPACE_SLACK 2.5

static void spacing_pair(struct checker *c, struct item *a, struct item *b)
{
	int na = c->art->shapes[a->shape].net, nb = c->art->shapes[b->shape].net;
	if (na == nb)
		return;
	double d;
	struct gp_point mid;
	if (a->rect && b->rect) {
		d = box_distance(a->box, b->box, &mid);
	} else {
		struct gp_geos_shape *ga = item_shape(c, a), *gb = item_shape(c, b);
		struct gp_point pa, pb;
		if (!ga || !gb || !gp_geos_shape_distance(c->geos, ga, gb, &d)) {
			c->failed = true;
			return;
		}
		if (d >= (double)c->lim->min_space - SPACE_SLACK)
			return;
		if (!gp_geos_shape_nearest(c->geos, ga, gb, &pa, &pb)) {
			c->failed = true;
			return;
		}
		mid = (struct gp_point){ (pa.x + pb.x) / 2, (pa.y + pb.y) / 2 };
	}
	if (d >= (double)c->lim->min_space - SPACE_SLACK)
		return;
	int lo = na < nb ? na : nb, hi = na < nb ? nb : na;
	struct gp_finding f = finding(GP_CHECK_SPACING, GP_SEVERITY_ERROR, lo,
				      hi, mid, d / 1e6,
				      gp_mm(c->lim->min_space), GP_UNIT_MM);
	f.detail = (int)a->plate;
	f.shape = (int)(na < 0 ? a->shape : b->shape);
	add_finding(c, &f);
}

static bool check_spacing(struct checker *c)
{
	struct gp_box *boxes = calloc(c->item_count + 1, sizeof(*boxes));
	if (!boxes)
		return oom(c);
	for (int plate = 0; plate < 2 && !c->failed; plate++) {
		/* boxes of the other plate stay empty: never paired */
		for (size_t k = 0; k < c->item_count; k++)
			boxes[k] = c->items[k].plate == (enum gp_plate)plate
					   ? c->items[k].box
					   : gp_box_none();
		struct gp_index_pair *pairs = NULL;
		size_t count = 0;
		if (!gp_geos_box_pairs(c->geos, boxes, c->item_count,
				       c->lim->min_space, &pairs, &count)) {
			c->failed = true;
			break;
		}
		for (size_t i = 0; i < count && !c->failed; i++)
			spacing_pair(c, &c->items[pairs[i].a],
				     &c->items[pairs[i].b]);
		free(pairs);
	}
	free(boxes);
	return !c->failed;
}

/* --- line width ---------------------------------------------------------- */

/* Width of the rectangle with the same area and perimeter: exact for
 * rectangles, close for long strips of even width. */
static double strip_width(double area, double perimeter)
{
	double disc = perimeter * perimeter - 16 * area;
	return (perimeter - sqrt(disc > 0 ? disc : 0)) / 4;
}

static double ring_length(const struct gp_ring *r)
{
	double sum = 0;
	for (size_t i = 0; i < r->count; i++) {
		struct gp_point a = r->points[i], b = r->points[(i + 1) % r->count];
		sum += hypot((double)(b.x - a.x), (double)(b.y - a.y));
	}
	return sum;
}

static double polygon_perimeter(const struct gp_polygon *p)
{
	double sum = ring_length(&p->outer);
	for (size_t h = 0; h < p->hole_count; h++)
		sum += ring_length(&p->holes[h]);
	return sum;
}

static void thin_finding(struct checker *c, const struct item *it,
			 double width_nm, struct gp_point place)
{
	int net = c->art->shapes[it->shape].net;
	struct gp_finding f = finding(GP_CHECK_LINE_WIDTH, GP_SEVERITY_ERROR,
				      net, GP_NET_NONE, place, width_nm / 1e6,
				      gp_mm(c->lim->min_line), GP_UNIT_MM);
	f.shape = (int)it->shape;
	f.detail = (int)it->plate;
	add_finding(c, &f);
}

/* Erode by half the minimum line and grow back (mitred joins, which give
 * back every corner that survives): what does not come back is thinner
 * than the minimum line. */
static void line_width_shape(struct checker *c, struct item *it)
{
	/* a stroke within a nanometre or two of the limit (snapping) passes */
	int64_t half = c->lim->min_line / 2 - (int64_t)SNAP_SLACK;
	struct gp_geos_shape *g = item_shape(c, it);
	struct gp_geos_shape *eroded =
		g ? gp_geos_shape_offset(c->geos, g, -half, GP_JOIN_MITRE,
					 c->lim->chord_tolerance)
		  : NULL;
	struct gp_geos_shape *opened =
		eroded ? gp_geos_shape_offset(c->geos, eroded, half + 1,
					      GP_JOIN_MITRE,
					      c->lim->chord_tolerance)
		       : NULL;
	struct gp_geos_shape *thin =
		opened ? gp_geos_shape_difference(c->geos, g, opened) : NULL;
	struct gp_polyset pieces;
	gp_polyset_init(&pieces);
	if (!thin || !gp_geos_shape_to_polyset(c->geos, thin, &pieces)) {
		c->failed = true;
	} else {
		/* corners cut by the mitre limit leave crumbs: a thin part
		 * must be at least a minimum line square */
		double floor_mm2 = gp_mm(c->lim->min_line) *
				   gp_mm(c->lim->min_line);
		for (size_t i = 0; i < pieces.count; i++) {
			const struct gp_polygon *p = &pieces.items[i];
			double area = gp_polygon_area_mm2(p) * 1e12;
			if (area / 1e12 < floor_mm2)
				continue;
			double w = strip_width(area, polygon_perimeter(p));
			if (w < (double)c->lim->min_line - 2 * SNAP_SLACK)
				thin_finding(c, it, w,
					     gp_box_centre(gp_polygon_bounds(p)));
		}
	}
	gp_polyset_finish(&pieces);
	gp_geos_shape_destroy(c->geos, eroded);
	gp_geos_shape_destroy(c->geos, opened);
	gp_geos_shape_destroy(c->geos, thin);
}

static bool check_line_width(struct checker *c)
{
	for (size_t k = 0; k < c->item_count && !c->failed; k++) {
		struct item *it = &c->items[k];
		if (it->rect) {
			int64_t w = gp_box_width(it->box), h = gp_box_height(it->box);
			int64_t narrow = w < h ? w : h;
			if (narrow < c->lim->min_line)
				thin_finding(c, it, (double)narrow,
					     gp_box_centre(it->box));
		} else {
			line_width_shape(c, it);
		}
	}
	return !c->failed;
}

/* --- registration -------------------------------------------------------- */

/* What counts for a pixel's lit area: its front electrode only (a front
 * lead or bridge lit by a shift is a gain, not the pixel), and every back
 * shape of its back net (patches, their bridges, strips). */
static bool lit_role(enum gp_plate plate, enum gp_role role)
{
	return role == GP_ROLE_ELECTRODE || plate == GP_PLATE_BACK;
}

/* Items of net on plate with a lit role whose box meets near. */
static size_t near_items(struct checker *c, int net, enum gp_plate plate,
			 struct gp_box near, size_t *out, size_t max)
{
	size_t n = 0;
	for (size_t i = c->net_first[net]; i < c->net_first[net + 1]; i++) {
		const struct item *it = &c->items[c->net_items[i]];
		const struct gp_shape *s = &c->art->shapes[it->shape];
		if (it->plate != plate || !lit_role(plate, s->role) ||
		    !gp_box_has_area(gp_box_meet(it->box, near)))
			continue;
		if (n < max)
			out[n] = c->net_items[i];
		n++;
	}
	return n;
}

static void rect_lit(struct gp_box f, struct gp_box b, int64_t shift,
		     double lit[9])
{
	for (int k = 0; k < GP_REGISTRATION_SHIFTS; k++) {
		int64_t dx = (k % 3 - 1) * shift, dy = (k / 3 - 1) * shift;
		struct gp_box moved = { b.x0 + dx, b.y0 + dy, b.x1 + dx,
					b.y1 + dy };
		lit[k] = gp_box_mm2(gp_box_meet(f, moved));
	}
}

static struct gp_geos_shape *union_items(struct checker *c,
					 const size_t *list, size_t n)
{
	struct gp_geos_shape **parts = calloc(n ? n : 1, sizeof(*parts));
	if (!parts)
		return NULL;
	for (size_t i = 0; i < n; i++)
		if (!(parts[i] = item_shape(c, &c->items[list[i]]))) {
			free(parts);
			return NULL;
		}
	struct gp_geos_shape *u = gp_geos_shape_union(c->geos, parts, n);
	free(parts);
	return u;
}

#define NEAR_MAX 64

enum lit_mode { LIT_AUTO, LIT_GEOS, LIT_EXACT };

/* lit[9] for pixel p; false when it cannot be computed (or, in LIT_EXACT,
 * when its shapes are not one rectangle on each plate). */
static bool pixel_lit(struct checker *c, size_t p, enum lit_mode mode,
		      double lit[9])
{
	const struct gp_pixel *px = &c->art->pixels[p];
	int fnet, bnet;
	if (!pixel_nets(c->art, px, &fnet, &bnet))
		return false;
	int64_t t = c->lim->registration;
	struct gp_box near = gp_box_grow(px->box, t + 1);
	size_t fl[NEAR_MAX], bl[NEAR_MAX];
	size_t nf = near_items(c, fnet, GP_PLATE_FRONT, near, fl, NEAR_MAX);
	size_t nb = near_items(c, bnet, GP_PLATE_BACK, near, bl, NEAR_MAX);
	if (nf == 0 || nb == 0) {
		memset(lit, 0, 9 * sizeof(*lit));
		return true;
	}
	if (nf > NEAR_MAX || nb > NEAR_MAX)
		return false;
	bool rects = nf == 1 && nb == 1 && c->items[fl[0]].rect &&
		     c->items[bl[0]].rect;
	if (mode != LIT_GEOS && rects) {
		rect_lit(c->items[fl[0]].box, c->items[bl[0]].box, t, lit);
		return true;
	}
	if (mode == LIT_EXACT)
		return false;
	struct gp_geos_shape *f = union_items(c, fl, nf);
	struct gp_geos_shape *b = union_items(c, bl, nb);
	struct gp_registration reg;
	bool ok = f && b &&
		  gp_patch_registration_shapes(c->geos, f, b, t, t, &reg);
	if (ok)
		memcpy(lit, reg.lit_mm2, 9 * sizeof(*lit));
	else
		c->failed = true;
	gp_geos_shape_destroy(c->geos, f);
	gp_geos_shape_destroy(c->geos, b);
	return ok;
}

static double pixel_nominal_mm2(const struct gp_pixel *px)
{
	/* an icon's further parts (its other letters) count too */
	if (px->shape.outer.count < 3)
		return gp_box_mm2(px->box);
	return gp_polygon_area_mm2(&px->shape) + gp_polyset_area_mm2(&px->more);
}

static bool check_registration(struct checker *c)
{
	for (size_t p = 0; p < c->art->pixel_count && !c->failed; p++) {
		double lit[9];
		const struct gp_pixel *px = &c->art->pixels[p];
		if (!pixel_lit(c, p, LIT_AUTO, lit))
			continue;
		c->rep->pixels_checked++;
		double nominal = pixel_nominal_mm2(px);
		int worst = 4;
		for (int k = 0; k < GP_REGISTRATION_SHIFTS; k++)
			if (lit[k] < lit[worst])
				worst = k;
		double loss = nominal > 0 ? (nominal - lit[worst]) / nominal : 0;
		if (loss <= c->lim->registration_loss)
			continue;
		int fnet, bnet;
		pixel_nets(c->art, px, &fnet, &bnet);
		struct gp_finding f = finding(
			GP_CHECK_REGISTRATION, GP_SEVERITY_ERROR, px->common,
			px->segment, gp_box_centre(px->box), loss,
			c->lim->registration_loss, GP_UNIT_FRACTION);
		f.pixel = (int)p;
		f.detail = worst;
		add_finding(c, &f);
	}
	return !c->failed;
}

/* --- electrical ---------------------------------------------------------- */

static double equivalent_squares(const struct gp_shape *s, struct gp_box box,
				 bool rect)
{
	if (rect) {
		int64_t w = gp_box_width(box), h = gp_box_height(box);
		return w > h ? (double)w / (double)h : (double)h / (double)w;
	}
	double area = gp_polygon_area_mm2(&s->poly) * 1e12;
	double width = strip_width(area, polygon_perimeter(&s->poly));
	return width > 0 ? area / (width * width) : 0;
}

static void net_loads(struct checker *c)
{
	const struct gp_artwork *art = c->art;
	const struct gp_check_limits *l = c->lim;
	for (size_t k = 0; k < c->item_count; k++) {
		const struct item *it = &c->items[k];
		const struct gp_shape *s = &art->shapes[it->shape];
		if (s->net < 0)
			continue;
		struct gp_net_load *load = &c->rep->nets[s->net];
		double sq = equivalent_squares(s, it->box, it->rect);
		double rs = l->sheet_resistance[it->plate];
		if (s->role == GP_ROLE_LEAD) {
			load->lead_squares += sq;
			load->resistance += rs * sq;
		} else if (s->role == GP_ROLE_ELECTRODE && it->rect) {
			/* a strip fed from one end: Elmore delay of a uniform
			 * RC line is R C / 2 */
			load->line_squares += sq;
			load->resistance += rs * sq / 2;
		}
	}
	/* stroked leads (paths with a width) count too */
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (!is_ito(s->layer) || !s->open_path || s->net < 0 ||
		    s->line_width <= 0)
			continue;
		double length = 0;
		for (size_t j = 0; j + 1 < s->poly.outer.count; j++) {
			struct gp_point a = s->poly.outer.points[j];
			struct gp_point b = s->poly.outer.points[j + 1];
			length += hypot((double)(b.x - a.x), (double)(b.y - a.y));
		}
		double sq = length / (double)s->line_width;
		struct gp_net_load *load = &c->rep->nets[s->net];
		load->lead_squares += sq;
		load->resistance +=
			l->sheet_resistance[s->layer == GP_LAYER_FRONT_ITO
						    ? GP_PLATE_FRONT
						    : GP_PLATE_BACK] *
			sq;
	}
	for (size_t p = 0; p < art->pixel_count; p++) {
		const struct gp_pixel *px = &art->pixels[p];
		double cap = gp_check_capacitance(pixel_nominal_mm2(px),
						  l->cell_gap, l->permittivity);
		int nets[2] = { px->common, px->segment };
		for (int k = 0; k < 2; k++) {
			if (nets[k] < 0 || (size_t)nets[k] >= art->net_count)
				continue;
			c->rep->nets[nets[k]].capacitance += cap;
			c->rep->nets[nets[k]].pixels++;
		}
	}
	for (size_t n = 0; n < art->net_count; n++)
		c->rep->nets[n].tau =
			c->rep->nets[n].resistance * c->rep->nets[n].capacitance;
}

/* A place for a net's finding: the centre of its first shape. */
static struct gp_point net_place(struct checker *c, int net)
{
	if (c->net_first[net] == c->net_first[net + 1])
		return (struct gp_point){ 0, 0 };
	return gp_box_centre(c->items[c->net_items[c->net_first[net]]].box);
}

static void check_electrical(struct checker *c)
{
	const struct gp_artwork *art = c->art;
	const struct gp_check_limits *l = c->lim;
	net_loads(c);
	bool any_lead = false;
	for (size_t n = 0; n < art->net_count; n++)
		any_lead |= c->rep->nets[n].lead_squares > 0;
	if (!any_lead)
		gp_buffer_puts(&c->rep->notes,
			       "lead resistance: no leads in the artwork yet; "
			       "resistance covers electrode strips only\n");
	if (l->row_time <= 0)
		gp_buffer_puts(&c->rep->notes,
			       "rc-time: no row time (drive settings); not "
			       "checked\n");
	for (size_t n = 0; n < art->net_count; n++) {
		const struct gp_net_load *load = &c->rep->nets[n];
		double lead_r = load->lead_squares > 0
					? load->resistance -
						  l->sheet_resistance
							  [art->nets[n].plate] *
							  load->line_squares / 2
					: 0;
		if (l->max_resistance > 0 && lead_r > l->max_resistance) {
			struct gp_finding f = finding(
				GP_CHECK_RESISTANCE, GP_SEVERITY_WARNING, (int)n,
				GP_NET_NONE, net_place(c, (int)n), lead_r,
				l->max_resistance, GP_UNIT_OHM);
			add_finding(c, &f);
		}
		if (l->row_time > 0 && load->tau > 0 &&
		    l->row_time < l->rc_warning * load->tau) {
			bool error = l->row_time < l->rc_error * load->tau;
			struct gp_finding f = finding(
				GP_CHECK_RC,
				error ? GP_SEVERITY_ERROR : GP_SEVERITY_WARNING,
				(int)n, GP_NET_NONE, net_place(c, (int)n),
				load->tau,
				l->row_time / (error ? l->rc_error
						     : l->rc_warning),
				GP_UNIT_SECOND);
			add_finding(c, &f);
		}
	}
	/* spread of lead resistance among nets of one kind */
	for (int kind = 0; kind < 2 && any_lead; kind++) {
		int lo = -1, hi = -1;
		for (size_t n = 0; n < art->net_count; n++) {
			if ((int)art->nets[n].kind != kind ||
			    c->rep->nets[n].lead_squares <= 0)
				continue;
			double r = c->rep->nets[n].resistance;
			if (lo < 0 || r < c->rep->nets[lo].resistance)
				lo = (int)n;
			if (hi < 0 || r > c->rep->nets[hi].resistance)
				hi = (int)n;
		}
		if (lo < 0 || lo == hi)
			continue;
		double ratio = c->rep->nets[hi].resistance /
			       c->rep->nets[lo].resistance;
		if (ratio > l->spread_warning) {
			struct gp_finding f = finding(
				GP_CHECK_SPREAD, GP_SEVERITY_WARNING, hi, lo,
				net_place(c, hi), ratio, l->spread_warning,
				GP_UNIT_RATIO);
			add_finding(c, &f);
		}
	}
}

/* --- connector ----------------------------------------------------------- */

static void check_connector(struct checker *c)
{
	size_t pads = 0;
	for (size_t k = 0; k < c->item_count; k++)
		pads += c->art->shapes[c->items[k].shape].role == GP_ROLE_PAD;
	if (pads == 0 || c->lim->conductor_pitch <= 0) {
		gp_buffer_puts(&c->rep->notes,
			       pads == 0 ? "connector-fit: no pads in the "
					   "artwork yet; not checked\n"
					 : "connector-fit: no connector "
					   "conductor pitch; not checked\n");
		return;
	}
	/* pads of one row are side by side along x: each pad and each gap
	 * must hold min_conductors conductors of the strip */
	int64_t need = c->lim->min_conductors * c->lim->conductor_pitch;
	const struct item *prev = NULL;
	for (size_t k = 0; k < c->item_count; k++) {
		const struct item *it = &c->items[k];
		const struct gp_shape *s = &c->art->shapes[it->shape];
		if (s->role != GP_ROLE_PAD)
			continue;
		/* the pad's width is its narrow side; the gap is measured
		 * along the row, which runs along its width */
		int64_t w = gp_box_width(it->box), h = gp_box_height(it->box);
		if (h < w)
			w = h;
		if (w < need) {
			struct gp_finding f = finding(
				GP_CHECK_CONNECTOR, GP_SEVERITY_ERROR, s->net,
				GP_NET_NONE, gp_box_centre(it->box), gp_mm(w),
				gp_mm(need), GP_UNIT_MM);
			f.shape = (int)it->shape;
			add_finding(c, &f);
		}
		int64_t gap = -1;
		struct gp_point mid = gp_box_centre(it->box);
		if (prev && prev->box.y0 < it->box.y1 &&
		    it->box.y0 < prev->box.y1) {
			bool right = prev->box.x1 <= it->box.x0;
			gap = right ? it->box.x0 - prev->box.x1
				    : prev->box.x0 - it->box.x1;
			mid.x = right ? prev->box.x1 + gap / 2
				      : it->box.x1 + gap / 2;
		} else if (prev && prev->box.x0 < it->box.x1 &&
			   it->box.x0 < prev->box.x1) {
			bool up = prev->box.y1 <= it->box.y0;
			gap = up ? it->box.y0 - prev->box.y1
				 : prev->box.y0 - it->box.y1;
			mid.y = up ? prev->box.y1 + gap / 2 : it->box.y1 + gap / 2;
		}
		if (gap >= 0 && gap < need) {
			struct gp_finding f = finding(
				GP_CHECK_CONNECTOR, GP_SEVERITY_ERROR,
				c->art->shapes[prev->shape].net, s->net, mid,
				gp_mm(gap), gp_mm(need), GP_UNIT_MM);
			add_finding(c, &f);
		}
		prev = it;
	}
}

/* --- placement ----------------------------------------------------------- */

static void check_edges(struct checker *c)
{
	const struct gp_check_limits *l = c->lim;
	for (size_t k = 0; k < c->item_count; k++) {
		const struct item *it = &c->items[k];
		struct gp_box plate = l->plate[it->plate];
		if (gp_box_is_empty(plate))
			continue;
		struct gp_box b = it->box;
		/* least distance from the shape to each edge, inside > 0;
		 * a pad keeps its own ledge's clearance from the edge it
		 * faces */
		int64_t d[4] = { b.x0 - plate.x0, plate.x1 - b.x1,
				 b.y0 - plate.y0, plate.y1 - b.y1 };
		static const int side_of[4] = { 3, 1, 0, 2 };
		bool pad = c->art->shapes[it->shape].role == GP_ROLE_PAD;
		int64_t limit[4];
		int worst = -1;
		for (int i = 0; i < 4; i++) {
			int64_t own = l->pad_clearance[it->plate][side_of[i]];
			limit[i] = pad && own >= 0 ? own : l->edge_clearance;
			if (d[i] < limit[i] &&
			    (worst < 0 || d[i] - limit[i] < d[worst] - limit[worst]))
				worst = i;
		}
		if (worst < 0)
			continue;
		struct gp_point mid = gp_box_centre(b);
		struct gp_point place = {
			worst == 0 ? b.x0 : worst == 1 ? b.x1 : mid.x,
			worst == 2 ? b.y0 : worst == 3 ? b.y1 : mid.y
		};
		int net = c->art->shapes[it->shape].net;
		struct gp_finding f = finding(GP_CHECK_EDGE, GP_SEVERITY_ERROR,
					      net, GP_NET_NONE, place,
					      gp_mm(d[worst]), gp_mm(limit[worst]),
					      GP_UNIT_MM);
		f.shape = (int)it->shape;
		f.detail = (int)it->plate;
		add_finding(c, &f);
	}
}

static void check_view(struct checker *c)
{
	struct gp_box v = c->lim->viewing;
	if (gp_box_is_empty(v))
		return;
	for (size_t p = 0; p < c->art->pixel_count; p++) {
		const struct gp_pixel *px = &c->art->pixels[p];
		if (gp_box_inside(px->box, v))
			continue;
		struct gp_box b = px->box;
		int64_t out = 0, d[4] = { v.x0 - b.x0, b.x1 - v.x1, v.y0 - b.y0,
					  b.y1 - v.y1 };
		for (int i = 0; i < 4; i++)
			out = d[i] > out ? d[i] : out;
		struct gp_finding f = finding(
			GP_CHECK_VIEW, GP_SEVERITY_WARNING, px->common,
			px->segment, gp_box_centre(b), gp_mm(out), 0, GP_UNIT_MM);
		f.pixel = (int)p;
		add_finding(c, &f);
	}
}

/* Electrodes and patches must keep off the seal (leads may cross it);
 * the viewing area must be inside it. */
static void check_seal(struct checker *c)
{
	if (!c->has_seal) {
		gp_buffer_puts(&c->rep->notes,
			       "seal-clearance: no seal in the artwork yet; "
			       "not checked\n");
		return;
	}
	for (size_t i = 0; i < c->art->shape_count && !c->failed; i++) {
		const struct gp_shape *seal = &c->art->shapes[i];
		if (seal->layer != GP_LAYER_SEAL || seal->role != GP_ROLE_SEAL)
			continue;
		struct gp_geos_shape *sg =
			gp_geos_shape_from_polygon(c->geos, &seal->poly);
		if (!sg) {
			c->failed = true;
			break;
		}
		for (size_t k = 0; k < c->item_count; k++) {
			struct item *it = &c->items[k];
			const struct gp_shape *s = &c->art->shapes[it->shape];
			if (s->role != GP_ROLE_ELECTRODE &&
			    s->role != GP_ROLE_PATCH)
				continue;
			struct gp_geos_shape *g = item_shape(c, it);
			if (!g || !gp_geos_shape_overlaps_area(c->geos, sg, g))
				continue;
			struct gp_geos_shape *m =
				gp_geos_shape_intersection(c->geos, sg, g);
			if (!m) {
				c->failed = true;
				break;
			}
			struct gp_finding f = finding(
				GP_CHECK_SEAL, GP_SEVERITY_ERROR, s->net,
				GP_NET_NONE,
				gp_box_centre(gp_geos_shape_bounds(m)),
				gp_geos_shape_area_mm2(c->geos, m), 0,
				GP_UNIT_MM2);
			f.shape = (int)it->shape;
			add_finding(c, &f);
			gp_geos_shape_destroy(c->geos, m);
		}
		gp_geos_shape_destroy(c->geos, sg);
	}
	struct gp_box v = c->lim->viewing;
	bool view_inside = true;
	if (c->inside && !gp_box_is_empty(v)) {
		struct gp_geos_shape *vs = gp_geos_shape_from_box(c->geos, v);
		view_inside = !vs || gp_geos_shape_covers(c->geos, c->inside, vs);
		gp_geos_shape_destroy(c->geos, vs);
	} else if (c->inside_is_box && !gp_box_is_empty(v) &&
		   !gp_box_is_empty(c->lim->seal_inside)) {
		view_inside = gp_box_inside(v, c->inside_box);
	}
	if (!view_inside) {
		struct gp_finding f = finding(GP_CHECK_SEAL, GP_SEVERITY_ERROR,
					      GP_NET_NONE, GP_NET_NONE,
					      gp_box_centre(v), 0, 0,
					      GP_UNIT_MM2);
		add_finding(c, &f);
	}
	/* pads belong on the ledge, outside the seal */
	for (size_t k = 0; k < c->item_count; k++) {
		const struct item *it = &c->items[k];
		const struct gp_shape *s = &c->art->shapes[it->shape];
		struct gp_box m = gp_box_meet(it->box, c->inside_box);
		if (s->role != GP_ROLE_PAD || !gp_box_has_area(m))
			continue;
		struct gp_finding f = finding(GP_CHECK_SEAL, GP_SEVERITY_ERROR,
					      s->net, GP_NET_NONE,
					      gp_box_centre(m), gp_box_mm2(m), 0,
					      GP_UNIT_MM2);
		f.shape = (int)it->shape;
		f.detail = 1;
		add_finding(c, &f);
	}
}

/* --- text and order ------------------------------------------------------ */

static const char *net_name(const struct gp_artwork *art, int net)
{
	return net >= 0 && (size_t)net < art->net_count ? art->nets[net].name
							: "(no net)";
}

static const char *const shift_names[9] = {
	"left and down", "down", "right and down", "left", "nominal",
	"right", "left and up", "up", "right and up",
};

static void describe(const struct gp_artwork *art, struct gp_finding *f)
{
	const char *a = net_name(art, f->nets[0]), *b = net_name(art, f->nets[1]);
	const char *plate = f->detail == GP_PLATE_BACK ? "back" : "front";
	switch (f->rule) {
	case GP_CHECK_PARASITIC:
		snprintf(f->text, sizeof(f->text),
			 "%s and %s overlap by %.6f mm2 where no pixel is "
			 "meant; it shows when both are driven",
			 a, b, f->value);
		break;
	case GP_CHECK_SPACING:
		snprintf(f->text, sizeof(f->text),
			 "%s and %s are %.4f mm apart on the %s plate; the "
			 "minimum space is %.4f mm", a, b, f->value, plate,
			 f->limit);
		break;
	case GP_CHECK_LINE_WIDTH:
		snprintf(f->text, sizeof(f->text),
			 "%s is %.4f mm wide on the %s plate; the minimum "
			 "line is %.4f mm", a, f->value, plate, f->limit);
		break;
	case GP_CHECK_REGISTRATION:
		snprintf(f->text, sizeof(f->text),
			 "pixel %s/%s loses %.2f%% of its area when the back "
			 "plate moves %s; at most %.2f%% is allowed",
			 net_name(art, f->nets[0]), b, 100 * f->value,
			 f->detail >= 0 && f->detail < 9
				 ? shift_names[f->detail]
				 : "?",
			 100 * f->limit);
		break;
	case GP_CHECK_RESISTANCE:
		snprintf(f->text, sizeof(f->text),
			 "%s leads have %.0f ohm; the limit is %.0f ohm", a,
			 f->value, f->limit);
		break;
	case GP_CHECK_SPREAD:
		snprintf(f->text, sizeof(f->text),
			 "%s has %.2f times the lead resistance of %s (more "
			 "than %.2f): uneven contrast", a, f->value, b,
			 f->limit);
		break;
	case GP_CHECK_RC:
		snprintf(f->text, sizeof(f->text),
			 "%s has an RC time of %.3g s; the row time allows "
			 "%.3g s", a, f->value, f->limit);
		break;
	case GP_CHECK_CONNECTOR:
		snprintf(f->text, sizeof(f->text),
			 f->nets[1] >= 0
				 ? "the gap between the pads of %s and %s is "
				   "%.4f mm; the connector needs %.4f mm"
				 : "the pad of %s%s is %.4f mm wide; the "
				   "connector needs %.4f mm",
			 a, f->nets[1] >= 0 ? b : "", f->value, f->limit);
		break;
	case GP_CHECK_EDGE:
		snprintf(f->text, sizeof(f->text),
			 "%s is %.4f mm from the %s plate's edge; the "
			 "clearance is %.4f mm", a, f->value, plate, f->limit);
		break;
	case GP_CHECK_VIEW:
		snprintf(f->text, sizeof(f->text),
			 "pixel %s/%s reaches %.4f mm outside the viewing area",
			 a, b, f->value);
		break;
	case GP_CHECK_DRIVE: /* described where it is made */
		break;
	case GP_CHECK_SEAL:
		if (f->nets[0] < 0)
			snprintf(f->text, sizeof(f->text),
				 "the viewing area is not inside the seal");
		else
			snprintf(f->text, sizeof(f->text),
				 f->detail == 1 ? "the pad of %s lies inside "
						  "the seal (%.6f mm2)"
						: "%s lies under the seal "
						  "(%.6f mm2)",
				 a, f->value);
		break;
	case GP_CHECK_RULE_COUNT:
		break;
	}
}

static int compare_findings(const void *pa, const void *pb)
{
	const struct gp_finding *a = pa, *b = pb;
	if (a->severity != b->severity)
		return a->severity > b->severity ? -1 : 1;
	if (a->rule != b->rule)
		return a->rule < b->rule ? -1 : 1;
	for (int i = 0; i < 2; i++)
		if (a->nets[i] != b->nets[i])
			return a->nets[i] < b->nets[i] ? -1 : 1;
	if (a->pixel != b->pixel)
		return a->pixel < b->pixel ? -1 : 1;
	if (a->place.x != b->place.x)
		return a->place.x < b->place.x ? -1 : 1;
	if (a->place.y != b->place.y)
		return a->place.y < b->place.y ? -1 : 1;
	return a->shape < b->shape ? -1 : a->shape > b->shape;
}

/* --- the run ------------------------------------------------------------- */

static bool checker_init(struct checker *c, struct gp_geos *geos,
			 const struct gp_artwork *art,
			 const struct gp_check_limits *limits,
			 struct gp_check_report *report, struct gp_diag *diag)
{
	memset(c, 0, sizeof(*c));
	c->geos = geos;
	c->art = art;
	c->lim = limits;
	c->rep = report;
	c->diag = diag;
	return collect_items(c) && index_pixels(c);
}

static void checker_finish(struct checker *c)
{
	for (size_t k = 0; c->items && k < c->item_count; k++)
		gp_geos_shape_destroy(c->geos, c->items[k].g);
	gp_geos_shape_destroy(c->geos, c->inside);
	free(c->items);
	free(c->net_first);
	free(c->net_items);
	free(c->pairs);
	free(c->back_first);
	free(c->pair_next);
	free(c->slots);
}

static bool run_checks(struct checker *c)
{
	if (!find_inside(c) || !check_parasitic(c) || !check_spacing(c) ||
	    !check_line_width(c) || !check_registration(c))
		return false;
	check_electrical(c);
	check_connector(c);
	check_edges(c);
	check_view(c);
	check_seal(c);
	return !c->failed;
}

bool gp_check_run(struct gp_geos *geos, const struct gp_artwork *art,
		  const struct gp_check_limits *limits,
		  struct gp_check_report *report, struct gp_diag *diag)
{
	struct checker c;
	report->limits = *limits;
	report->nets = calloc(art->net_count ? art->net_count : 1,
			      sizeof(*report->nets));
	report->net_count = art->net_count;
	if (!report->nets)
		return gp_diag_oom(diag, NULL);
	bool ok = checker_init(&c, geos, art, limits, report, diag) &&
		  run_checks(&c);
	checker_finish(&c);
	if (!ok)
		return gp_diag_error(diag, NULL, "checks could not be completed");
	for (size_t i = 0; i < report->count; i++) {
		describe(art, &report->findings[i]);
		if (report->findings[i].severity == GP_SEVERITY_ERROR)
			report->errors++;
		else if (report->findings[i].severity == GP_SEVERITY_WARNING)
			report->warnings++;
	}
	if (report->count > 1)
		qsort(report->findings, report->count,
		      sizeof(*report->findings), compare_findings);
	return true;
}

/* --- single-pixel entry points for tests -------------------------------- */

static bool one_pixel(struct gp_geos *geos, const struct gp_artwork *art,
		      size_t pixel, int64_t shift, enum lit_mode mode,
		      double lit[9])
{
	struct gp_check_limits limits;
	struct gp_check_report report;
	struct gp_diag diag;
	struct checker c;
	gp_check_limits_default(&limits);
	limits.registration = shift;
	gp_check_report_init(&report);
	gp_diag_init(&diag);
	bool ok = pixel < art->pixel_count &&
		  checker_init(&c, geos, art, &limits, &report, &diag);
	if (ok) {
		ok = pixel_lit(&c, pixel, mode, lit);
		checker_finish(&c);
	}
	gp_check_report_finish(&report);
	gp_diag_finish(&diag);
	return ok;
}

bool gp_check_pixel_lit_geos(struct gp_geos *geos,
			     const struct gp_artwork *art, size_t pixel,
			     int64_t shift, double lit[9])
{
	return one_pixel(geos, art, pixel, shift, LIT_GEOS, lit);
}

bool gp_check_pixel_lit_exact(const struct gp_artwork *art, size_t pixel,
			      int64_t shift, double lit[9])
{
	return one_pixel(NULL, art, pixel, shift, LIT_EXACT, lit);
}
