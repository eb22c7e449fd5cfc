/* Segment digits into the artwork: nets, electrodes, lead-ins, intended
 * pixels, back patches (lib/patch.h) and a spacing check of what the row
 * puts on the segment plate.
 *
 * Nets: each row has its own commons COM (one when static, `duty` when
 * multiplexed, shared by every unit of the row), made before its segment
 * lines, which go unit by unit (sign unit first), line by line. */
#include "layout.h"
#include "digits.h"
#include "geos.h"
#include "patch.h"

#include "units.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static bool make_nets(struct gp_build *build, const struct gp_digits *row,
		      struct gp_digit_row *out, struct gp_diag *diag)
{
	struct gp_artwork *art = &build->art;
	enum gp_plate seg_plate = build->design->segment_plate;
	enum gp_plate com_plate = gp_common_plate(build->design);
	out->first_common = (int)art->net_count;
	out->common_count = row->duty;
	for (int c = 0; c < row->duty; c++)
		if (gp_artwork_add_net(art, GP_NET_COMMON, com_plate) < 0)
			return gp_diag_oom(diag, NULL);
	out->first_segment = (int)art->net_count;
	for (size_t i = 0; i < out->unit_count; i++) {
		struct gp_digit_unit *u = &out->units[i];
		int first = (int)art->net_count;
		u->first_line_net = first;
		for (int l = 0; l < u->line_count; l++)
			if (gp_artwork_add_net(art, GP_NET_SEGMENT, seg_plate) < 0)
				return gp_diag_oom(diag, NULL);
		for (int k = 0; k < u->part_count; k++) {
			struct gp_digit_part *p = &u->parts[k];
			p->common_net = out->first_common + p->common - 1;
			p->segment_net = first + p->line - 1;
		}
		for (size_t k = 0; k < out->port_count; k++)
			if (out->ports[k].unit == (int)i)
				out->ports[k].net = first + out->ports[k].line - 1;
	}
	out->segment_count = (int)art->net_count - out->first_segment;
	return true;
}

static bool add_copy(struct gp_artwork *art, enum gp_layer layer,
		     enum gp_role role, int net, const struct gp_polygon *poly)
{
	struct gp_polygon copy;
	if (!gp_polygon_copy(&copy, poly))
		return false;
	if (!gp_artwork_add_shape(art, layer, role, net, &copy)) {
		gp_polygon_finish(&copy);
		return false;
	}
	return true;
}

static bool add_front(struct gp_build *build, size_t row_index,
		      struct gp_digit_row *out, struct gp_diag *diag)
{
	struct gp_artwork *art = &build->art;
	enum gp_layer layer = gp_plate_ito_layer(build->design->segment_plate);
	for (size_t i = 0; i < out->unit_count; i++) {
		struct gp_digit_unit *u = &out->units[i];
		for (int k = 0; k < u->part_count; k++) {
			struct gp_digit_part *p = &u->parts[k];
			for (int j = 0; j < p->poly_count; j++) {
				if (!add_copy(art, layer, GP_ROLE_ELECTRODE,
					      p->segment_net, &p->poly[j]))
					return gp_diag_oom(diag, NULL);
				struct gp_pixel *px = gp_artwork_add_pixel(
					art, p->common_net, p->segment_net,
					gp_polygon_bounds(&p->poly[j]));
				if (!px || !gp_polygon_copy(&px->shape, &p->poly[j]))
					return gp_diag_oom(diag, NULL);
				/* a: digit from 0 (-1: the sign unit),
				 * b: part, c: its polygon, d: unit */
				px->owner_kind = GP_OWNER_DIGITS;
				px->owner = (int)row_index;
				px->a = u->number - 1;
				px->b = k;
				px->c = j;
				px->d = (int)i;
			}
		}
		int first = u->first_line_net;
		for (int t = 0; t < u->trace_count; t++) {
			struct gp_digit_trace *tr = &u->traces[t];
			if (!add_copy(art, layer, GP_ROLE_LEAD,
				      first + tr->line - 1, &tr->poly))
				return gp_diag_oom(diag, NULL);
		}
	}
	return true;
}

/* Groups of front shapes, one per (unit, common); one for the whole row
 * when static ("one common patch under all segments"). */
struct groups {
	struct gp_patch_group *items;
	struct gp_polygon **shapes;   /* per group, copies owned here */
	int *common_net;
	size_t count;
};

static void groups_finish(struct groups *g)
{
	for (size_t i = 0; i < g->count; i++) {
		for (size_t k = 0; g->shapes && k < g->items[i].front_count; k++)
			gp_polygon_finish(&g->shapes[i][k]);
		if (g->shapes)
			free(g->shapes[i]);
	}
	free(g->items);
	free(g->shapes);
	free(g->common_net);
}

static bool group_add(struct groups *g, size_t gi, const struct gp_polygon *p)
{
	struct gp_patch_group *item = &g->items[gi];
	struct gp_polygon *grown = realloc(g->shapes[gi],
					   (item->front_count + 1) * sizeof(*grown));
	if (!grown)
		return false;
	g->shapes[gi] = grown;
	if (!gp_polygon_copy(&grown[item->front_count], p))
		return false;
	item->front_count++;
	item->front = grown;
	return true;
}

static size_t group_of(const struct gp_digits *row, size_t unit,
		       const struct gp_digit_part *p)
{
	return row->duty == 1 ? 0 : unit * (size_t)row->duty + (size_t)p->common - 1;
}

static bool make_groups(const struct gp_digits *row, struct gp_digit_row *out,
			struct groups *g)
{
	memset(g, 0, sizeof(*g));
	size_t n = row->duty == 1 ? 1 : out->unit_count * (size_t)row->duty;
	g->items = calloc(n, sizeof(*g->items));
	g->shapes = calloc(n, sizeof(*g->shapes));
	g->common_net = calloc(n, sizeof(*g->common_net));
	if (!g->items || !g->shapes || !g->common_net)
		return false;
	g->count = n;
	for (size_t i = 0; i < n; i++) {
		g->common_net[i] = out->first_common + (int)(i % (size_t)row->duty);
		g->items[i].name = "digits";
	}
	for (size_t i = 0; i < out->unit_count; i++) {
		struct gp_digit_unit *u = &out->units[i];
		for (int k = 0; k < u->part_count; k++) {
			struct gp_digit_part *p = &u->parts[k];
			size_t gi = group_of(row, i, p);
			for (int j = 0; j < p->poly_count; j++)
				if (!group_add(g, gi, &p->poly[j]))
					return false;
		}
	}
	return true;
}

/* --- static backing ------------------------------------------------------------ */

static int64_t cross3(struct gp_point o, struct gp_point a, struct gp_point b)
{
	/* coordinates stay below 10 m (GP_LENGTH_MAX): products fit */
	return (a.x - o.x) * (b.y - o.y) - (a.y - o.y) * (b.x - o.x);
}

static int cmp_point(const void *a, const void *b)
{
	const struct gp_point *p = a, *q = b;
	if (p->x != q->x)
		return p->x < q->x ? -1 : 1;
	return (p->y > q->y) - (p->y < q->y);
}

/* Convex hull of points (monotone chain), counter-clockwise. */
static bool hull_of(struct gp_point *pts, size_t n, struct gp_polygon *out)
{
	gp_polygon_init(out);
	if (n < 3)
		return true;
	qsort(pts, n, sizeof(*pts), cmp_point);
	struct gp_point *h = malloc(2 * n * sizeof(*h));
	if (!h)
		return false;
	size_t k = 0;
	for (size_t i = 0; i < n; i++) {
		while (k >= 2 && cross3(h[k - 2], h[k - 1], pts[i]) <= 0)
			k--;
		h[k++] = pts[i];
	}
	for (size_t i = n - 1, t = k + 1; i-- > 0;) {
		while (k >= t && cross3(h[k - 2], h[k - 1], pts[i]) <= 0)
			k--;
		h[k++] = pts[i];
	}
	bool ok = true;
	for (size_t i = 0; ok && i + 1 < k; i++)
		ok = gp_ring_push(&out->outer, h[i].x, h[i].y);
	free(h);
	return ok;
}

/* Hull of a unit's figure and point: the region a static common fills. */
static bool unit_hull(const struct gp_digit_unit *u, struct gp_polygon *out)
{
	size_t n = 0;
	for (int k = 0; k < u->part_count; k++)
		if (strcmp(u->parts[k].name, "colon") != 0)
			for (int j = 0; j < u->parts[k].poly_count; j++)
				n += u->parts[k].poly[j].outer.count;
	struct gp_point *pts = malloc((n ? n : 1) * sizeof(*pts));
	if (!pts)
		return false;
	n = 0;
	for (int k = 0; k < u->part_count; k++) {
		if (strcmp(u->parts[k].name, "colon") == 0)
			continue;
		for (int j = 0; j < u->parts[k].poly_count; j++) {
			const struct gp_ring *r = &u->parts[k].poly[j].outer;
			memcpy(pts + n, r->points, r->count * sizeof(*pts));
			n += r->count;
		}
	}
	bool ok = hull_of(pts, n, out);
	free(pts);
	return ok;
}

/* A static common also fills the counters and gaps of each digit, so that
 * it is one electrode per digit rather than an island per segment: the
 * hull of the digit grown by the margin, less everything within the
 * clearance of a lead-in (outside the segments), added to the patch. */
static bool static_fill(struct gp_geos *geos, const struct gp_digit_row *out,
			const struct gp_patch_rules *pr, struct gp_polyset *patch)
{
	struct gp_polyset hulls, grown, traces, fronts, bare, zone, fill, all;
	struct gp_polyset *sets[] = { &hulls, &grown, &traces, &fronts,
				      &bare,  &zone,  &fill,   &all };
	bool ok = false;
	for (size_t i = 0; i < sizeof(sets) / sizeof(*sets); i++)
		gp_polyset_init(sets[i]);
	for (size_t i = 0; i < out->unit_count; i++) {
		const struct gp_digit_unit *u = &out->units[i];
		struct gp_polygon h;
		if (!unit_hull(u, &h) || !gp_polyset_take(&hulls, &h))
			goto done;
		for (int t = 0; t < u->trace_count; t++) {
			struct gp_polygon c;
			if (!gp_polygon_copy(&c, &u->traces[t].poly) ||
			    !gp_polyset_take(&traces, &c))
				goto done;
		}
		for (int k = 0; k < u->part_count; k++)
			for (int j = 0; j < u->parts[k].poly_count; j++) {
				struct gp_polygon c;
				if (!gp_polygon_copy(&c, &u->parts[k].poly[j]) ||
				    !gp_polyset_take(&fronts, &c))
					goto done;
			}
	}
	if (!gp_geos_dilate_box(geos, &hulls, pr->margin, pr->margin, &grown) ||
	    !gp_geos_difference(geos, &traces, &fronts, &bare) ||
	    !gp_geos_dilate_box(geos, &bare, pr->clearance, pr->clearance,
				&zone) ||
	    !gp_geos_difference(geos, &grown, &zone, &fill))
		goto done;
	for (size_t i = 0; i < patch->count; i++) {
		struct gp_polygon c;
		if (!gp_polygon_copy(&c, &patch->items[i]) ||
		    !gp_polyset_take(&fill, &c))
			goto done;
	}
	if (!gp_geos_union_set(geos, &fill, &all))
		goto done;
	gp_polyset_finish(patch);
	*patch = all;
	gp_polyset_init(&all);
	ok = true;
done:
	for (size_t i = 0; i < sizeof(sets) / sizeof(*sets); i++)
		gp_polyset_finish(sets[i]);
	return ok;
}

static bool add_patches(struct gp_build *build, const struct gp_digits *row,
			struct gp_digit_row *out, struct gp_geos *geos,
			struct gp_diag *diag)
{
	const struct gp_rules *rules = &build->design->rules;
	struct groups g;
	struct gp_polygon *traces = NULL;
	struct gp_polyset *patches = NULL;
	size_t trace_count = 0;
	bool ok = false;
	if (!make_groups(row, out, &g))
		goto done;
	for (size_t i = 0; i < out->unit_count; i++)
		trace_count += (size_t)out->units[i].trace_count;
	traces = calloc(trace_count ? trace_count : 1, sizeof(*traces));
	patches = calloc(g.count, sizeof(*patches));
	if (!traces || !patches)
		goto done;
	size_t t = 0;
	for (size_t i = 0; i < out->unit_count; i++)
		for (int k = 0; k < out->units[i].trace_count; k++)
			traces[t++] = out->units[i].traces[k].poly;
	for (size_t i = 0; i < g.count; i++)
		gp_polyset_init(&patches[i]);
	/* A trace must stay clear of patches under any shift of up to the
	 * registration in x and in y: cleared by exactly that box.  Both
	 * boxes are 2 nm larger, so that snapping the results to the 1 nm
	 * grid cannot leave a sliver short. */
	struct gp_patch_rules pr = {
		.margin = rules->registration + 2,
		.min_space = rules->min_space,
		.clearance = rules->registration + 2,
		.chord_tolerance = rules->chord_tolerance,
		.clearance_box = true,
	};
	if (!gp_patch_make(geos, g.items, g.count, traces, trace_count, &pr,
			   patches, diag))
		goto done;
	/* Where a lead-in leaves its segment the notch takes the segment's
	 * margin there: a shift toward the lead-in uncovers a sliver at most
	 * (line + 2 registration) wide.  Keeping the margin instead would
	 * put the lead-in's root under the patch, an overlap outside the
	 * pixel; both at once cannot be had.  The check measures the loss. */
	if (row->duty == 1 && !static_fill(geos, out, &pr, &patches[0]))
		goto done;
	enum gp_layer layer = gp_plate_ito_layer(gp_common_plate(build->design));
	for (size_t i = 0; i < g.count; i++)
		for (size_t k = 0; k < patches[i].count; k++)
			if (!gp_artwork_add_shape(&build->art, layer,
						  GP_ROLE_PATCH, g.common_net[i],
						  &patches[i].items[k]))
				goto done;
	ok = true;
done:
	for (size_t i = 0; patches && i < g.count; i++)
		gp_polyset_finish(&patches[i]);
	free(patches);
	free(traces); /* borrowed polygons: only the array is ours */
	groups_finish(&g);
	if (!ok && diag->errors == 0)
		gp_diag_oom(diag, NULL);
	return ok;
}

/* --- spacing on the segment plate ------------------------------------------- */

struct front_item {
	const struct gp_polygon *poly;
	int net;
	int unit;
	int part;   /* -1 for a trace */
	int trace;
};

static void describe(const struct gp_digit_row *out, const struct front_item *it,
		     char *buffer, size_t size)
{
	const struct gp_digit_unit *u = &out->units[it->unit];
	char label[32];
	gp_digit_unit_label(u, label, sizeof(label));
	if (it->part >= 0) {
		snprintf(buffer, size, "'%s' of %s", u->parts[it->part].name,
			 label);
		return;
	}
	int from = u->traces[it->trace].part;
	if (from >= 0)
		snprintf(buffer, size, "the lead-in of '%s' of %s",
			 u->parts[from].name, label);
	else
		snprintf(buffer, size, "the joining bar of line %d of %s",
			 u->traces[it->trace].line, label);
}

static bool check_spacing(const struct gp_build *build,
			  const struct gp_digits *row,
			  const struct gp_digit_row *out, struct gp_geos *geos,
			  struct gp_diag *diag)
{
	const struct gp_rules *rules = &build->design->rules;
	size_t n = 0;
	for (size_t i = 0; i < out->unit_count; i++) {
		for (int k = 0; k < out->units[i].part_count; k++)
			n += (size_t)out->units[i].parts[k].poly_count;
		n += (size_t)out->units[i].trace_count;
	}
	struct front_item *items = calloc(n ? n : 1, sizeof(*items));
	struct gp_box *boxes = calloc(n ? n : 1, sizeof(*boxes));
	struct gp_geos_shape **shapes = calloc(n ? n : 1, sizeof(*shapes));
	struct gp_index_pair *pairs = NULL;
	size_t pair_count = 0, made = 0, reported = 0;
	bool ok = false;
	if (!items || !boxes || !shapes)
		goto done;
	size_t c = 0;
	for (size_t i = 0; i < out->unit_count; i++) {
		const struct gp_digit_unit *u = &out->units[i];
		int first = u->first_line_net;
		for (int k = 0; k < u->part_count; k++) {
			const struct gp_digit_part *p = &u->parts[k];
			for (int j = 0; j < p->poly_count; j++)
				items[c++] = (struct front_item){
					&p->poly[j], p->segment_net, (int)i, k, -1 };
		}
		for (int t = 0; t < u->trace_count; t++)
			items[c++] = (struct front_item){
				&u->traces[t].poly, first + u->traces[t].line - 1,
				(int)i, -1, t };
	}
	for (; made < n; made++) {
		boxes[made] = gp_polygon_bounds(items[made].poly);
		shapes[made] = gp_geos_shape_from_polygon(geos, items[made].poly);
		if (!shapes[made])
			goto done;
	}
	if (!gp_geos_box_pairs(geos, boxes, n, rules->min_space, &pairs,
			       &pair_count))
		goto done;
	for (size_t k = 0; k < pair_count; k++) {
		const struct front_item *a = &items[pairs[k].a];
		const struct front_item *b = &items[pairs[k].b];
		double d;
		if (a->net == b->net)
			continue;
		if (!gp_geos_shape_distance(geos, shapes[pairs[k].a],
					    shapes[pairs[k].b], &d))
			goto done;
		/* the lead-ins are drawn 2 nm over width; allow that much */
		if (d >= (double)rules->min_space - 2.5)
			continue;
		if (++reported > 20)
			continue;
		char da[96], db[96], dd[32], sp[32];
		describe(out, a, da, sizeof(da));
		describe(out, b, db, sizeof(db));
		gp_format_mm_short(dd, sizeof(dd), (int64_t)floor(d));
		gp_format_mm_short(sp, sizeof(sp), rules->min_space);
		gp_diag_error(diag, &row->where,
			      "digits '%s': %s comes %s mm from %s, closer than "
			      "the minimum space %s mm; widen the gap or the "
			      "pitch, or narrow the lines",
			      row->name, da, dd, db, sp);
	}
	ok = reported == 0;
done:
	for (size_t i = 0; i < made; i++)
		gp_geos_shape_destroy(geos, shapes[i]);
	free(shapes);
	free(boxes);
	free(items);
	free(pairs);
	if (!ok && reported == 0 && diag->errors == 0)
		gp_diag_oom(diag, NULL);
	return ok;
}

/* --- lead ends --------------------------------------------------------------- */

/* A static row's common is one net but a piece per digit (and per colon):
 * the pieces are joined on the common plate by a riser from each up to a
 * bus above the row.  Above the figures the segment plate is free but for
 * the top bars' lead-ins, which turn outwards from the bar's ends, so the
 * risers go up from the middle of each top bar (from the upper colon dot,
 * which its lower dot joins straight below it). */
static bool push_line(struct gp_polyset *set, struct gp_point a,
		      struct gp_point b, int64_t w)
{
	struct gp_polygon poly;
	gp_polygon_init(&poly);
	int64_t h = w / 2;
	struct gp_box box = a.x == b.x
		? gp_box_make(a.x - h, a.y < b.y ? a.y : b.y, a.x + h,
			      a.y < b.y ? b.y : a.y)
		: gp_box_make(a.x < b.x ? a.x : b.x, a.y - h,
			      a.x < b.x ? b.x : a.x, a.y + h);
	return gp_polygon_set_box(&poly, box) && gp_polyset_take(set, &poly);
}

static bool static_bus(struct gp_build *build, const struct gp_digits *row,
		       struct gp_digit_row *out, struct gp_diag *diag)
{
	const struct gp_rules *rules = &build->design->rules;
	int64_t w = 2 * rules->min_line;
	int64_t keep = (int64_t)ceil(2 * sqrt(2.0) * (double)rules->registration) +
		       rules->min_space;
	int64_t top = INT64_MIN;
	for (size_t i = 0; i < out->unit_count; i++) {
		const struct gp_digit_unit *u = &out->units[i];
		for (int t = 0; t < u->trace_count; t++) {
			struct gp_box b = gp_polygon_bounds(&u->traces[t].poly);
			top = b.y1 > top ? b.y1 : top;
		}
		for (int k = 0; k < u->part_count; k++)
			for (int j = 0; j < u->parts[k].poly_count; j++) {
				struct gp_box b = gp_polygon_bounds(&u->parts[k].poly[j]);
				top = b.y1 > top ? b.y1 : top;
			}
	}
	int64_t bus_y = top + keep + w / 2;
	struct gp_polyset set;
	gp_polyset_init(&set);
	int64_t x0 = INT64_MAX, x1 = INT64_MIN;
	bool ok = true;
	for (size_t i = 0; ok && i < out->unit_count; i++) {
		const struct gp_digit_unit *u = &out->units[i];
		struct gp_figure_spec fs = row->figure;
		if (u->number == 0)
			fs.figure = GP_FIGURE_7;
		struct gp_figure_frame fr;
		gp_figure_frame(&fs, &fr);
		double v = fr.H - fr.S / 2;
		double uu = fs.figure == GP_FIGURE_16 ? fr.cc : fr.W / 2;
		if (u->number == 0)
			uu = fr.W - fr.sv / 2, v = (fr.mtop + fr.H - fr.S) / 2;
		struct gp_point a = { u->origin.x + llround(uu + v * fr.t),
				      u->origin.y + llround(v) };
		if (u->number == 0 && !row->one) /* the minus alone */
			a = (struct gp_point){ u->origin.x + llround(fr.W / 2 + fr.m * fr.t),
					       u->origin.y + llround(fr.m) };
		ok = push_line(&set, a, (struct gp_point){ a.x, bus_y }, w);
		x0 = a.x < x0 ? a.x : x0;
		x1 = a.x > x1 ? a.x : x1;
		for (int k = 0; ok && k < u->part_count; k++) {
			const struct gp_digit_part *p = &u->parts[k];
			if (strcmp(p->name, "colon") != 0)
				continue;
			struct gp_box lo = gp_polygon_bounds(&p->poly[0]);
			struct gp_box hi = gp_polygon_bounds(&p->poly[1]);
			struct gp_point cl = { (lo.x0 + lo.x1) / 2, (lo.y0 + lo.y1) / 2 };
			struct gp_point ch = { (hi.x0 + hi.x1) / 2, (hi.y0 + hi.y1) / 2 };
			ok = push_line(&set, cl, (struct gp_point){ cl.x, ch.y }, w) &&
			     push_line(&set, (struct gp_point){ cl.x, ch.y }, ch, w) &&
			     push_line(&set, ch, (struct gp_point){ ch.x, bus_y }, w);
			x0 = ch.x < x0 ? ch.x : x0;
			x1 = ch.x > x1 ? ch.x : x1;
		}
	}
	ok = ok && push_line(&set, (struct gp_point){ x0 - w / 2, bus_y },
			     (struct gp_point){ x1 + w / 2, bus_y }, w);
	enum gp_layer layer = gp_plate_ito_layer(gp_common_plate(build->design));
	for (size_t i = 0; ok && i < set.count; i++)
		ok = gp_artwork_add_shape(&build->art, layer, GP_ROLE_BRIDGE,
					  out->first_common, &set.items[i]) != NULL;
	int net = out->first_common;
	ok = ok &&
	     gp_build_add_lead_end(build, net, GP_SIDE_TOP,
				   (struct gp_point){ (x0 + x1) / 2, bus_y }, w) &&
	     gp_build_add_lead_end(build, net, GP_SIDE_LEFT,
				   (struct gp_point){ x0, bus_y }, w) &&
	     gp_build_add_lead_end(build, net, GP_SIDE_RIGHT,
				   (struct gp_point){ x1, bus_y }, w);
	gp_polyset_finish(&set);
	return ok || gp_diag_oom(diag, NULL);
}

/* --- the grid's commons ---------------------------------------------------------- */

struct grid_at {
	const struct gp_digit_unit *u;
	struct gp_figure_frame fr;
};

static struct gp_point gat(const struct grid_at *g, double u, double v)
{
	return (struct gp_point){ g->u->origin.x + llround(u + v * g->fr.t),
				  g->u->origin.y + llround(v) };
}

static bool back_line(struct gp_build *build, int net, const struct gp_point *pts,
		      size_t n, int64_t w)
{
	struct gp_polygon poly;
	if (!gp_digit_thick_line(pts, n, w, &poly))
		return false;
	enum gp_layer layer = gp_plate_ito_layer(gp_common_plate(build->design));
	if (gp_artwork_add_shape(&build->art, layer, GP_ROLE_BRIDGE, net, &poly))
		return true;
	gp_polygon_finish(&poly);
	return false;
}

static struct gp_point part_centre(const struct gp_digit_unit *u,
				   const char *name)
{
	for (int k = 0; k < u->part_count; k++)
		if (strcmp(u->parts[k].name, name) == 0) {
			struct gp_box b = gp_polygon_bounds(&u->parts[k].poly[0]);
			return (struct gp_point){ b.x0 / 2 + b.x1 / 2,
						  b.y0 / 2 + b.y1 / 2 };
		}
	return (struct gp_point){ 0, 0 };
}

/* The exits of one digit for each common, upright (u, v): left and right,
 * where the links to the neighbours start; and the links inside it. */
struct grid_exits {
	struct gp_point left[4], right[4];
};

/* Two points either side of the line through upright points (pu, pv) and
 * (qu, qv), at fraction t along it, reach from it (a link across a gap). */
static void across(const struct grid_at *g, double pu, double pv, double qu,
		   double qv, double t, double reach, struct gp_point out[2])
{
	double t0 = g->fr.t;
	double px = pu + pv * t0, py = pv, qx = qu + qv * t0, qy = qv;
	double mx = px + t * (qx - px), my = py + t * (qy - py);
	double dx = qx - px, dy = qy - py, l = sqrt(dx * dx + dy * dy);
	double nx = -dy / l, ny = dx / l;
	out[0] = (struct gp_point){ g->u->origin.x + llround(mx + nx * reach),
				    g->u->origin.y + llround(my + ny * reach) };
	out[1] = (struct gp_point){ g->u->origin.x + llround(mx - nx * reach),
				    g->u->origin.y + llround(my - ny * reach) };
}

static bool grid_digit(struct gp_build *build, const struct gp_digits *row,
		       const struct gp_digit_row *out, size_t i, double w,
		       double keep, struct grid_exits *x)
{
	struct grid_at g;
	g.u = &out->units[i];
	gp_figure_frame(&row->figure, &g.fr);
	const struct gp_figure_frame *f = &g.fr;
	double W = f->W, H = f->H, S = f->S, G = f->G, sv = f->sv;
	double upper = (f->mtop + H - S) / 2, lower = (S + f->mlo) / 2;
	double ul = -(keep + w / 2), ur = W + keep + w / 2;
	double vtop = H + keep + w / 2, v4 = -(keep + w / 2);
	double reach = G / 2 + 2.5 * w;
	int c0 = out->first_common;
	int64_t lw = (int64_t)w;
	bool bev = row->figure.ends == GP_ENDS_BEVELLED;
	/* COM1: a and b across the top right corner; out over a's left end
	 * (above f, which it must not cross) and from b's side */
	struct gp_point ab[2], fg[2];
	if (bev)
		across(&g, W, H, W - sv, H - S, 0.5, reach, ab);
	else
		across(&g, W - sv / 2, H - S - G / 2, W - sv / 2 + 1,
		       H - S - G / 2, 0, reach, ab);
	struct gp_point a_up[3] = { gat(&g, sv / 2 + G + S, H - S / 2),
				    gat(&g, sv / 2 + G + S, vtop),
				    gat(&g, ul, vtop) };
	struct gp_point b_out[3] = { gat(&g, W - sv / 2, upper),
				     gat(&g, ur, upper), gat(&g, ur, vtop) };
	/* COM2: f and g across their gap; out from f's side and from g's
	 * end through the gap between b and c */
	if (bev) {
		across(&g, sv / 2, f->m, sv, f->mtop, 0.5, reach, fg);
	} else {
		double v = (f->mc + G / 2 + f->mtop) / 2;
		double u = sv + G * f->sec / 2;
		across(&g, u, v, u, v + 1, 0, reach, fg);
	}
	struct gp_point f_out[2] = { gat(&g, sv / 2, upper), gat(&g, ul, upper) };
	struct gp_point g_out[2] = {
		gat(&g, W - sv - G * f->sec - S / 2, f->mc), gat(&g, ur, f->mc),
	};
	/* COM3: straight across e, the lower counter and c */
	struct gp_point ec[2] = { gat(&g, ul, lower), gat(&g, ur, lower) };
	/* COM4: from d's two ends down under the baseline: to the left, and
	 * to the point, which it enters from below beside the point's
	 * lead-in; out from the point's side */
	struct gp_point pc = part_centre(g.u, "dp");
	double r = (double)row->point_size / 2;
	double pv = (double)(pc.y - g.u->origin.y);
	double pu = (double)(pc.x - g.u->origin.x) - pv * f->t;
	double dl = bev ? sv + G + S / 2 : S, dr = W - sv - G - S / 2;
	struct gp_point d_left[3] = { gat(&g, dl, S / 2), gat(&g, dl, v4),
				      gat(&g, ul, v4) };
	struct gp_point dp_link[4] = {
		gat(&g, dr, S / 2), gat(&g, dr, v4), gat(&g, pu - r / 3, v4),
		gat(&g, pu - r / 3, pv),
	};
	double pr = pu + r + keep + w / 2;
	struct gp_point dp_out[3] = { gat(&g, pu, pv), gat(&g, pr, pv),
				      gat(&g, pr, v4) };
	x->left[0] = a_up[2];
	x->left[1] = f_out[1];
	x->left[2] = ec[0];
	x->left[3] = d_left[2];
	x->right[0] = b_out[2];
	x->right[1] = g_out[1];
	x->right[2] = ec[1];
	x->right[3] = dp_out[2];
	return back_line(build, c0, ab, 2, lw) &&
	       back_line(build, c0, a_up, 3, lw) &&
	       back_line(build, c0, b_out, 3, lw) &&
	       back_line(build, c0 + 1, fg, 2, lw) &&
	       back_line(build, c0 + 1, f_out, 2, lw) &&
	       back_line(build, c0 + 1, g_out, 2, lw) &&
	       back_line(build, c0 + 2, ec, 2, lw) &&
	       back_line(build, c0 + 3, d_left, 3, lw) &&
	       back_line(build, c0 + 3, dp_link, 4, lw) &&
	       back_line(build, c0 + 3, dp_out, 3, lw);
}

/* Links between digits, and lead ends at the row's two ends. */
static bool grid_back(struct gp_build *build, const struct gp_digits *row,
		      struct gp_digit_row *out, struct gp_diag *diag)
{
	const struct gp_rules *rules = &build->design->rules;
	double w = (double)rules->min_line + 2;
	double keep = fmax((double)rules->min_space,
			   2 * sqrt(2.0) * (double)rules->registration + 2);
	struct grid_exits prev = { 0 }, cur;
	bool ok = true;
	for (size_t i = 0; ok && i < out->unit_count; i++) {
		ok = grid_digit(build, row, out, i, w, keep, &cur);
		if (ok && i > 0) {
			int c0 = out->first_common;
			int64_t lw = (int64_t)w;
			int64_t mid = (prev.right[1].x + cur.left[1].x) / 2;
			struct gp_point l0[2] = { prev.right[0], cur.left[0] };
			struct gp_point l1[4] = {
				prev.right[1], { mid, prev.right[1].y },
				{ mid, cur.left[1].y }, cur.left[1],
			};
			struct gp_point l2[2] = { prev.right[2], cur.left[2] };
			struct gp_point l3[2] = { prev.right[3], cur.left[3] };
			ok = back_line(build, c0, l0, 2, lw) &&
			     back_line(build, c0 + 1, l1, 4, lw) &&
			     back_line(build, c0 + 2, l2, 2, lw) &&
			     back_line(build, c0 + 3, l3, 2, lw);
		}
		if (ok && i == 0)
			for (int k = 0; ok && k < 4; k++)
				ok = gp_build_add_lead_end(build, out->first_common + k,
							   GP_SIDE_LEFT, cur.left[k],
							   (int64_t)w);
		prev = cur;
	}
	for (int k = 0; ok && k < 4; k++)
		ok = gp_build_add_lead_end(build, out->first_common + k,
					   GP_SIDE_RIGHT, prev.right[k], (int64_t)w);
	return ok || gp_diag_oom(diag, NULL);
}

/* A banded row: its back links (inside the units and from unit to unit),
 * and its commons led out at the row's ends: at both when the row starts
 * with a digit, at the right when it starts with the sign unit (the
 * bands end there). */
static bool band_back(struct gp_build *build, struct gp_digit_row *out,
		      struct gp_diag *diag)
{
	enum gp_layer layer = gp_plate_ito_layer(gp_common_plate(build->design));
	for (size_t i = 0; i < out->unit_count; i++) {
		const struct gp_digit_unit *u = &out->units[i];
		for (int k = 0; k < u->back_count; k++)
			if (!add_copy(&build->art, layer, GP_ROLE_BRIDGE,
				      out->first_common + u->backs[k].common - 1,
				      &u->backs[k].poly))
				return gp_diag_oom(diag, NULL);
	}
	struct gp_figure_frame fr;
	gp_figure_frame(&build->design->digits[0].figure, &fr);
	for (int end = 0; end < 2; end++) {
		const struct gp_digit_unit *u =
			&out->units[end ? out->unit_count - 1 : 0];
		if (!end && u->number == 0)
			continue;
		for (int c = 0; c < out->common_count; c++) {
			const struct gp_digit_exit *e = end ? &u->right[c] : &u->left[c];
			if (!e->given)
				continue;
			struct gp_point at = {
				u->origin.x + llround(e->u + e->v * fr.t),
				u->origin.y + llround(e->v),
			};
			if (!gp_build_add_lead_end(build, out->first_common + c,
						   end ? GP_SIDE_RIGHT : GP_SIDE_LEFT,
						   at, (int64_t)u->lead))
				return gp_diag_oom(diag, NULL);
		}
	}
	return true;
}

/* Every segment line leaves from its port, down toward the ledge; a
 * multiplexed common from each of its patches' top (the patches of one
 * common are not joined yet: see the README). */
static bool offer_ends(struct gp_build *build, const struct gp_digits *row,
		       struct gp_digit_row *out, struct gp_diag *diag)
{
	for (size_t i = 0; i < out->port_count; i++)
		if (!gp_build_add_lead_end(build, out->ports[i].net,
					   GP_SIDE_BOTTOM, out->ports[i].at,
					   out->ports[i].width))
			return gp_diag_oom(diag, NULL);
	if (row->duty == 1)
		return static_bus(build, row, out, diag);
	if (gp_digits_grid(row))
		return grid_back(build, row, out, diag);
	if (out->units[0].banded)
		return band_back(build, out, diag);
	enum gp_layer layer = gp_plate_ito_layer(gp_common_plate(build->design));
	int64_t w = 2 * build->design->rules.min_line;
	for (size_t s = 0; s < build->art.shape_count; s++) {
		const struct gp_shape *sh = &build->art.shapes[s];
		if (sh->layer != layer || sh->role != GP_ROLE_PATCH ||
		    sh->net < out->first_common ||
		    sh->net >= out->first_common + out->common_count)
			continue;
		struct gp_point best = { 0, INT64_MIN };
		for (size_t k = 0; k < sh->poly.outer.count; k++)
			if (sh->poly.outer.points[k].y > best.y)
				best = sh->poly.outer.points[k];
		best.y -= w;
		if (!gp_build_add_lead_end(build, sh->net, GP_SIDE_TOP, best, w))
			return gp_diag_oom(diag, NULL);
	}
	return true;
}

void gp_digits_pixel_label(const struct gp_build *build,
			   const struct gp_pixel *px, char *buffer, size_t size)
{
	const struct gp_design *d = build->design;
	snprintf(buffer, size, "digits");
	if (px->owner_kind != GP_OWNER_DIGITS || px->owner < 0 ||
	    (size_t)px->owner >= build->digit_row_count)
		return;
	const struct gp_digit_row *row = &build->digit_rows[px->owner];
	if (px->d < 0 || (size_t)px->d >= row->unit_count)
		return;
	const struct gp_digit_unit *u = &row->units[px->d];
	if (px->b < 0 || px->b >= u->part_count)
		return;
	const char *name = u->parts[px->b].name;
	const char *piece = u->parts[px->b].poly_count < 2 ? ""
			    : px->c == 0 ? (strcmp(name, "one") ? " lower" : " upper")
					 : (strcmp(name, "one") ? " upper" : " lower");
	if (u->number == 0)
		snprintf(buffer, size, "digits %s sign %s%s",
			 d->digits[px->owner].name, name, piece);
	else
		snprintf(buffer, size, "digits %s digit %d %s%s",
			 d->digits[px->owner].name, u->number, name, piece);
}

/* Everything the row draws must lie where both plates are. */
static bool check_fits(const struct gp_build *build, const struct gp_digits *row,
		       const struct gp_digit_row *out, struct gp_diag *diag)
{
	const struct gp_design *d = build->design;
	struct gp_box f = d->front.box, k = d->back.box;
	struct gp_box both = {
		f.x0 > k.x0 ? f.x0 : k.x0, f.y0 > k.y0 ? f.y0 : k.y0,
		f.x1 < k.x1 ? f.x1 : k.x1, f.y1 < k.y1 ? f.y1 : k.y1,
	};
	struct gp_box e = gp_box_none();
	for (size_t i = 0; i < out->unit_count; i++) {
		const struct gp_digit_unit *u = &out->units[i];
		for (int p = 0; p < u->part_count; p++)
			for (int j = 0; j < u->parts[p].poly_count; j++)
				e = gp_box_union(e, gp_polygon_bounds(&u->parts[p].poly[j]));
		for (int t = 0; t < u->trace_count; t++)
			e = gp_box_union(e, gp_polygon_bounds(&u->traces[t].poly));
	}
	if (gp_box_is_empty(e) || (e.x0 >= both.x0 && e.x1 <= both.x1 &&
				   e.y0 >= both.y0 && e.y1 <= both.y1))
		return true;
	char x0[32], y0[32], x1[32], y1[32];
	gp_format_mm_short(x0, sizeof(x0), e.x0);
	gp_format_mm_short(y0, sizeof(y0), e.y0);
	gp_format_mm_short(x1, sizeof(x1), e.x1);
	gp_format_mm_short(y1, sizeof(y1), e.y1);
	return gp_diag_error(diag, &row->where,
			     "digits '%s' with their lead-ins span x %s..%s, "
			     "y %s..%s mm, which does not fit where the two "
			     "plates overlap",
			     row->name, x0, x1, y0, y1);
}

static const char *figure_name(enum gp_figure f)
{
	return f == GP_FIGURE_7 ? "7" : f == GP_FIGURE_14 ? "14" : "16";
}

static void note_row(struct gp_build *build, const struct gp_digits *row,
		     const struct gp_digit_row *out)
{
	char duty[16];
	if (row->duty == 1)
		snprintf(duty, sizeof(duty), "static");
	else
		snprintf(duty, sizeof(duty), "1/%d duty", row->duty);
	gp_buffer_printf(&build->notes,
			 "digits %s: %ld x %s-segment, %s, %d common%s, %d "
			 "segment line%s\n",
			 row->name, row->count, figure_name(row->figure.figure),
			 duty, out->common_count,
			 out->common_count == 1 ? "" : "s", out->segment_count,
			 out->segment_count == 1 ? "" : "s");
}

bool gp_digits_layout(struct gp_build *build, struct gp_diag *diag)
{
	const struct gp_design *design = build->design;
	if (design->digit_count == 0)
		return true;
	build->digit_rows = calloc(design->digit_count,
				   sizeof(*build->digit_rows));
	struct gp_geos *geos = gp_geos_create(diag);
	bool ok = build->digit_rows && geos;
	if (!ok)
		gp_diag_oom(diag, NULL);
	struct gp_digit_rules dr = {
		.line = design->rules.min_line,
		.space = design->rules.min_space,
		.registration = design->rules.registration,
		.chord_tolerance = design->rules.chord_tolerance,
	};
	for (size_t i = 0; ok && i < design->digit_count; i++) {
		const struct gp_digits *row = &design->digits[i];
		struct gp_digit_row *out = &build->digit_rows[i];
		ok = gp_digits_plan(row, &dr, out, diag) &&
		     check_fits(build, row, out, diag) &&
		     make_nets(build, row, out, diag) &&
		     add_front(build, i, out, diag) &&
		     check_spacing(build, row, out, geos, diag) &&
		     add_patches(build, row, out, geos, diag) &&
		     offer_ends(build, row, out, diag);
		if (ok) {
			build->digit_row_count = i + 1;
			note_row(build, row, out);
		} else {
			gp_digit_row_finish(out);
		}
	}
	gp_geos_destroy(geos);
	return ok;
}

void gp_digit_rows_free(struct gp_digit_row *rows, size_t count)
{
	for (size_t i = 0; rows && i < count; i++)
		gp_digit_row_finish(&rows[i]);
	free(rows);
}
