/* Joining split nets: a net whose ITO on its plate is in several pieces
 * (icons sharing a segment or a named common, an icon on a dot-matrix
 * row's common, the per-digit patches of a multiplexed common) gets buses
 * on the same plate, inside the seal, found by the grid router (maze.h):
 * each bus keeps the minimum space from other nets on its plate and does
 * not overlap the other plate's ITO, but for back patches of other nets
 * near its own ends, which are notched round it as round any lead.  The
 * pieces are joined one at a time, the nearest first, growing from the
 * largest.  What cannot be joined is left for the routing to merge
 * outside the seal (or reported). */
#include "maze.h"
#include "route-private.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Room round the pieces that a bus may use to go round things. */
#define JOIN_ROOM (1500 * 1000)

static bool is_ito(enum gp_layer layer)
{
	return layer == GP_LAYER_FRONT_ITO || layer == GP_LAYER_BACK_ITO;
}

/* The pieces of net on its plate: the union of its ITO there. */
static bool net_pieces(struct route *r, struct gp_geos *geos,
		       const size_t *shapes, size_t count,
		       struct gp_polyset *out)
{
	struct gp_polyset all;
	gp_polyset_init(&all);
	bool ok = true;
	for (size_t k = 0; ok && k < count; k++) {
		struct gp_polygon copy;
		ok = gp_polygon_copy(&copy, &r->build->art.shapes[shapes[k]].poly) &&
		     gp_polyset_take(&all, &copy);
	}
	ok = ok && gp_geos_union_set(geos, &all, out);
	gp_polyset_finish(&all);
	return ok;
}

static struct gp_box set_bounds(const struct gp_polyset *s)
{
	struct gp_box b = gp_box_none();
	for (size_t i = 0; i < s->count; i++)
		b = gp_box_union(b, gp_polygon_bounds(&s->items[i]));
	return b;
}

struct join {
	struct route *r;
	struct gp_geos *geos;
	int net;
	enum gp_plate plate;
	struct gp_polyset pieces;
	bool *joined;             /* per piece */
	int target;               /* the piece to reach, -1: any */
};

/* Marks what is in the window: other nets' ITO (same plate, other plate,
 * patches), the joined pieces as the start and the rest as targets. */
static void mark(struct join *j, struct gp_maze *m, struct gp_box window)
{
	const struct gp_artwork *art = &j->r->build->art;
	enum gp_layer mine = gp_plate_ito_layer(j->plate);
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (!is_ito(s->layer) || s->net == j->net || s->open_path ||
		    !gp_box_touch(gp_polygon_bounds(&s->poly), window))
			continue;
		enum gp_maze_layer layer = s->layer == mine ? GP_MAZE_SAME
					   : s->role == GP_ROLE_PATCH
						   ? GP_MAZE_PATCH
						   : GP_MAZE_OTHER;
		/* marks, text and nothing of a net keep the space too */
		gp_maze_mark_polygon(m, layer, &s->poly);
	}
	/* where the other nets will most likely lead out: straight from
	 * their electrodes toward their ledges */
	for (size_t i = 0; i < j->r->net_count; i++) {
		const struct netstate *n = &j->r->nets[i];
		if ((int)i == j->net || n->ledge < 0 || gp_box_is_empty(n->centre))
			continue;
		struct gp_box c = n->centre, in = j->r->s_in;
		switch (j->r->ledges[n->ledge].side) {
		case GP_SIDE_BOTTOM: c.y1 = c.y0, c.y0 = in.y0; break;
		case GP_SIDE_TOP: c.y0 = c.y1, c.y1 = in.y1; break;
		case GP_SIDE_LEFT: c.x1 = c.x0, c.x0 = in.x0; break;
		default: c.x0 = c.x1, c.x1 = in.x1; break;
		}
		if (!gp_box_is_empty(c) && gp_box_touch(c, window))
			gp_maze_mark_box(m, GP_MAZE_SHADOW, c);
	}
	for (size_t k = 0; k < j->pieces.count; k++)
		if (j->joined[k] || j->target < 0 || (int)k == j->target)
			gp_maze_mark_polygon(m, j->joined[k] ? GP_MAZE_OWN
							     : GP_MAZE_TARGET,
					     &j->pieces.items[k]);
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->net == j->net && s->layer == mine &&
		    s->role == GP_ROLE_PATCH)
			gp_maze_mark_polygon(m, GP_MAZE_FRAGILE, &s->poly);
	}
}

/* The bus keeps its distances (the grid's promise, checked with GEOS). */
static bool bus_clear(struct join *j, const struct gp_polygon *bus,
		      bool *clear)
{
	const struct gp_artwork *art = &j->r->build->art;
	enum gp_layer mine = gp_plate_ito_layer(j->plate);
	struct gp_box bb = gp_polygon_bounds(bus);
	int64_t space = j->r->min_space;
	struct gp_box near = gp_box_grow(bb, space);
	/* what the bus adds: inside its own net's ITO it changes nothing */
	struct gp_geos_shape *whole = gp_geos_shape_from_polygon(j->geos, bus);
	struct gp_geos_shape *own =
		gp_geos_shape_from_polyset(j->geos, &j->pieces);
	struct gp_geos_shape *b = whole && own
		? gp_geos_shape_difference(j->geos, whole, own) : NULL;
	gp_geos_shape_destroy(j->geos, whole);
	gp_geos_shape_destroy(j->geos, own);
	if (!b)
		return false;
	*clear = true;
	bool ok = true;
	for (size_t i = 0; ok && *clear && i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (!is_ito(s->layer) || s->net == j->net || s->open_path ||
		    (s->layer != mine && s->role == GP_ROLE_PATCH) ||
		    !gp_box_touch(gp_polygon_bounds(&s->poly), near))
			continue;
		struct gp_geos_shape *o =
			gp_geos_shape_from_polygon(j->geos, &s->poly);
		ok = o != NULL;
		if (ok && s->layer == mine) {
			double d = 0;
			ok = gp_geos_shape_distance(j->geos, b, o, &d);
			*clear = d >= (double)space - 1;
		} else if (ok) {
			*clear = !gp_geos_shape_overlaps_area(j->geos, b, o);
		}
		gp_geos_shape_destroy(j->geos, o);
	}
	gp_geos_shape_destroy(j->geos, b);
	return ok;
}

/* Patches of other nets on the other plate that the bus comes near are
 * notched round it. */
static bool notch_round(struct join *j, const struct gp_polygon *bus)
{
	struct gp_artwork *art = &j->r->build->art;
	enum gp_layer other = gp_plate_ito_layer(
		j->plate == GP_PLATE_FRONT ? GP_PLATE_BACK : GP_PLATE_FRONT);
	struct gp_box bb = gp_polygon_bounds(bus);
	int64_t c = 2 * j->r->design->rules.registration;
	bb = gp_box_grow(bb, c);
	bool ok = true;
	size_t count = art->shape_count;
	for (size_t i = 0; ok && i < count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->layer == other && s->role == GP_ROLE_PATCH &&
		    s->net != j->net &&
		    gp_box_touch(gp_polygon_bounds(&s->poly), bb))
			ok = gp_route_notch(j->r, j->geos, i, bus, j->net);
	}
	return ok;
}

/* Which pieces the bus reaches: they join. */
static bool mark_reached(struct join *j, const struct gp_polygon *bus,
			 bool *any)
{
	*any = false;
	struct gp_geos_shape *b = gp_geos_shape_from_polygon(j->geos, bus);
	bool ok = b != NULL;
	for (size_t k = 0; ok && k < j->pieces.count; k++) {
		if (j->joined[k])
			continue;
		struct gp_geos_shape *p =
			gp_geos_shape_from_polygon(j->geos, &j->pieces.items[k]);
		ok = p != NULL;
		if (ok && gp_geos_shape_intersects(j->geos, b, p))
			j->joined[k] = *any = true;
		gp_geos_shape_destroy(j->geos, p);
	}
	gp_geos_shape_destroy(j->geos, b);
	return ok;
}

/* One bus from the joined pieces to the nearest other one; *found says
 * whether there was one. */
static bool one_bus(struct join *j, struct gp_box window, int64_t width,
		    bool *found)
{
	struct route *r = j->r;
	const struct gp_rules *rules = &r->design->rules;
	int64_t cell = gp_maze_cell_for(window, min64(width, r->min_space) + 2 * 1000);
	*found = false;
	/* a window with no room for a grid has no path: not found, and the
	 * caller says which pieces stay apart (this was once reported as
	 * "out of memory") */
	if (!gp_maze_fits(window, cell))
		return true;
	struct gp_maze *m = gp_maze_create(window, cell);
	if (!m)
		return gp_diag_oom(r->diag, NULL);
	mark(j, m, window);
	struct gp_maze_rules mr = {
		.width = width,
		.space = r->min_space,
		.other = 0,
		.soft_other = (int64_t)ceil((double)rules->registration * SQRT2),
		.patch_reach = 2 * rules->registration + width,
		.shadow_reach = JOIN_ROOM,
		.side_cost = { -1, -1, -1, -1 },
		.to_target = true,
		.end_depth = 2 * rules->registration + width,
	};
	struct gp_maze_path path;
	bool ok = gp_maze_route(m, &mr, &path, found);
	gp_maze_destroy(m);
	if (!ok)
		return gp_diag_oom(r->diag, NULL);
	if (!*found)
		return true;
	struct gp_polygon bus;
	gp_polygon_init(&bus);
	bool clear = false;
	ok = gp_route_path_polygon(path.points, path.count, width, &bus) &&
	     bus_clear(j, &bus, &clear);
	bool reached = false;
	if (ok && clear)
		ok = mark_reached(j, &bus, &reached);
	if (ok && clear && reached) {
		ok = notch_round(j, &bus);
		if (ok)
			ok = gp_artwork_add_shape(&r->build->art,
						  gp_plate_ito_layer(j->plate),
						  GP_ROLE_BRIDGE, j->net,
						  &bus) != NULL;
	}
	*found = clear && reached;
	gp_polygon_finish(&bus);
	gp_maze_path_finish(&path);
	return ok;
}

/* The box round the target piece and the joined pieces' point nearest
 * to it. */
static bool nearest_box(struct join *j, struct gp_box *out)
{
	struct gp_polyset done;
	gp_polyset_init(&done);
	bool ok = true;
	for (size_t k = 0; ok && k < j->pieces.count; k++) {
		struct gp_polygon copy;
		if (j->joined[k])
			ok = gp_polygon_copy(&copy, &j->pieces.items[k]) &&
			     gp_polyset_take(&done, &copy);
	}
	const struct gp_polygon *t = &j->pieces.items[j->target];
	struct gp_geos_shape *a = ok ? gp_geos_shape_from_polygon(j->geos, t) : NULL;
	struct gp_geos_shape *b = a ? gp_geos_shape_from_polyset(j->geos, &done)
				    : NULL;
	struct gp_point pa, pb;
	ok = b && gp_geos_shape_nearest(j->geos, a, b, &pa, &pb);
	if (ok)
		*out = gp_box_union(gp_polygon_bounds(t),
				    gp_box_make(pb.x, pb.y, pb.x, pb.y));
	gp_geos_shape_destroy(j->geos, a);
	gp_geos_shape_destroy(j->geos, b);
	gp_polyset_finish(&done);
	return ok || gp_diag_oom(j->r->diag, NULL);
}

static bool join_pieces(struct join *j, size_t *left)
{
	struct route *r = j->r;
	size_t n = j->pieces.count;
	/* start from the largest piece */
	size_t first = 0;
	double most = -1;
	for (size_t k = 0; k < n; k++) {
		double a = gp_polygon_area_mm2(&j->pieces.items[k]);
		if (a > most)
			most = a, first = k;
	}
	j->joined[first] = true;
	bool ok = true;
	int64_t widths[2] = { min64(r->g->leads.width,
				    max64(2 * r->design->rules.min_line,
					  r->design->rules.min_line)),
			      r->design->rules.min_line };
	for (;;) {
		size_t open = 0;
		for (size_t k = 0; k < n; k++)
			open += !j->joined[k];
		if (open == 0)
			break;
		/* the nearest open piece, in a window round it and the
		 * joined ones; failing that any piece, anywhere in the seal */
		struct gp_box done = gp_box_none();
		for (size_t k = 0; k < n; k++)
			if (j->joined[k])
				done = gp_box_union(done, gp_polygon_bounds(
								  &j->pieces.items[k]));
		double best = -1;
		for (size_t k = 0; k < n; k++) {
			struct gp_box b = gp_polygon_bounds(&j->pieces.items[k]);
			double dx = (double)max64(0, max64(b.x0 - done.x1, done.x0 - b.x1));
			double dy = (double)max64(0, max64(b.y0 - done.y1, done.y0 - b.y1));
			if (!j->joined[k] && (best < 0 || dx * dx + dy * dy < best)) {
				best = dx * dx + dy * dy;
				j->target = (int)k;
			}
		}
		/* first round: round the target and the nearest point of the
		 * joined pieces */
		struct gp_box close = done;
		ok = nearest_box(j, &close);
		bool found = false;
		for (int round = 0; ok && !found && round < 2; round++) {
			struct gp_box near = round ? set_bounds(&j->pieces) : close;
			int64_t room = round ? 2 * JOIN_ROOM : JOIN_ROOM;
			struct gp_box window = gp_box_meet(
				gp_box_grow(near, room),
				r->s_in);
			if (round)
				j->target = -1;
			for (int w = 0; ok && !found && w < 2; w++)
				if (w == 0 || widths[1] != widths[0])
					ok = one_bus(j, window, widths[w], &found);
		}
		if (!ok || !found)
			break;
	}
	*left = 0;
	for (size_t k = 0; k < n; k++)
		*left += !j->joined[k];
	return ok;
}

static bool report_split(struct join *j)
{
	char a[32], b[32], c[32], d[32];
	struct gp_box p = gp_box_none(), q = gp_box_none();
	for (size_t k = 0; k < j->pieces.count; k++) {
		struct gp_box bb = gp_polygon_bounds(&j->pieces.items[k]);
		if (j->joined[k])
			p = gp_box_union(p, bb);
		else if (gp_box_is_empty(q))
			q = bb;
	}
	struct route *r = j->r;
	/* a multiplexed digit row's common: walled in by the lead-ins */
	const struct gp_build *bd = r->build;
	for (size_t i = 0; i < bd->digit_row_count; i++) {
		const struct gp_digit_row *row = &bd->digit_rows[i];
		const struct gp_digits *dr = &r->design->digits[i];
		if (j->net < row->first_common ||
		    j->net >= row->first_common + row->common_count)
			continue;
		return gp_diag_error(
			r->diag, &dr->where,
			"digits '%s': the patches of %s (one per digit and "
			"common, %zu pieces) cannot be joined: the lead-ins "
			"beside each digit wall them in (near (%s, %s) mm); "
			"only static rows and the 1/4-duty grid (7 segments "
			"with a point on every digit, no colon, no sign unit, "
			"the documented assignment) can be routed",
			dr->name, net_name(r, j->net), j->pieces.count,
			mm(a, (q.x0 + q.x1) / 2), mm(b, (q.y0 + q.y1) / 2));
	}
	return gp_diag_error(
		r->diag, NULL,
		"%s: %s is in %zu pieces on the %s plate and the piece near "
		"(%s, %s) mm cannot be joined to the one near (%s, %s) mm "
		"inside the seal without crossing other electrodes, leads or "
		"the ways other leads take to the ledge; "
		"give the elements their own %s, or move them together",
		r->design->spec->file, net_name(r, j->net), j->pieces.count,
		j->plate == GP_PLATE_FRONT ? "front" : "back",
		mm(a, (q.x0 + q.x1) / 2), mm(b, (q.y0 + q.y1) / 2),
		mm(c, (p.x0 + p.x1) / 2), mm(d, (p.y0 + p.y1) / 2),
		r->build->art.nets[j->net].kind == GP_NET_COMMON ? "commons"
								  : "segments");
}

/* Shapes of each net on its plate, by net: net n's are
 * items[first[n] .. first[n + 1]). */
static bool on_plate(const struct route *r, const struct gp_shape *s)
{
	const struct gp_artwork *art = &r->build->art;
	return s->net >= 0 && (size_t)s->net < r->net_count && !s->open_path &&
	       s->layer == gp_plate_ito_layer(art->nets[s->net].plate);
}

static bool shapes_by_net(struct route *r, size_t **first, size_t **items)
{
	const struct gp_artwork *art = &r->build->art;
	size_t *fill = calloc(r->net_count + 1, sizeof(*fill));
	*first = calloc(r->net_count + 1, sizeof(**first));
	*items = calloc(art->shape_count + 1, sizeof(**items));
	if (!fill || !*first || !*items) {
		free(fill);
		return false;
	}
	for (size_t i = 0; i < art->shape_count; i++)
		if (on_plate(r, &art->shapes[i]))
			(*first)[art->shapes[i].net + 1]++;
	for (size_t n = 0; n < r->net_count; n++)
		(*first)[n + 1] += (*first)[n];
	for (size_t i = 0; i < art->shape_count; i++) {
		int net = art->shapes[i].net;
		if (on_plate(r, &art->shapes[i]))
			(*items)[(*first)[net] + fill[net]++] = i;
	}
	free(fill);
	return true;
}

bool gp_route_join(struct route *r, struct gp_geos *geos)
{
	size_t *first = NULL, *items = NULL;
	bool ok = shapes_by_net(r, &first, &items);
	for (size_t n = 0; ok && n < r->net_count; n++) {
		size_t a = first[n], b = first[n + 1];
		if (b - a < 2 || r->nets[n].ledge < 0)
			continue;
		struct join j = { .r = r, .geos = geos, .net = (int)n,
				  .plate = r->build->art.nets[n].plate };
		gp_polyset_init(&j.pieces);
		ok = net_pieces(r, geos, items + a, b - a, &j.pieces);
		if (ok && j.pieces.count > 1) {
			j.joined = calloc(j.pieces.count, sizeof(*j.joined));
			size_t left = 0;
			ok = j.joined && join_pieces(&j, &left);
			if (ok && left)
				ok = report_split(&j);
			free(j.joined);
		}
		gp_polyset_finish(&j.pieces);
	}
	free(first);
	free(items);
	if (!ok && r->diag->errors == 0)
		gp_diag_error(r->diag, NULL, "%s: joining the pieces of a net "
			      "failed", r->design->spec->file);
	return ok;
}
