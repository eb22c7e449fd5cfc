/* Routing every net to a pad: choosing lead ends, the straight lead-outs
 * inside the seal, notches in back patches, common transfers; each ledge
 * is then routed by ledge.c.
 *
 * Each ledge is routed in its own "canonical" frame, the glass turned so
 * that the ledge is at the bottom; the results are turned back (turns by
 * multiples of 90 degrees are exact in integers). */
#include "route-private.h"

#include "array.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* --- ledge checks ---------------------------------------------------------- */

/* How far plate a sticks out past plate b on side s (negative: less). */
static int64_t overhang(struct gp_box a, struct gp_box b, enum gp_side s)
{
	int64_t d = box_edge(a, s) - box_edge(b, s);
	return s == GP_SIDE_BOTTOM || s == GP_SIDE_LEFT ? -d : d;
}

static bool resolve_ledge_plate(struct route *r, struct gp_ledge *l)
{
	const struct gp_design *d = r->design;
	int64_t front = overhang(d->front.box, d->back.box, l->side);
	if (!l->plate_given) {
		if (front == 0)
			return gp_diag_error(r->diag, &l->where,
					     "ledge '%s': the front and back "
					     "plates end together at the %s; "
					     "make one plate overhang there "
					     "for the pads",
					     l->name, gp_side_name(l->side));
		l->plate = front > 0 ? GP_PLATE_FRONT : GP_PLATE_BACK;
	}
	int64_t out = l->plate == GP_PLATE_FRONT ? front : -front;
	if (out <= 0)
		return gp_diag_error(r->diag, &l->where,
				     "ledge '%s': the %s plate does not "
				     "overhang the other plate at the %s, so "
				     "there is no room for pads there",
				     l->name,
				     l->plate == GP_PLATE_FRONT ? "front"
								: "back",
				     gp_side_name(l->side));
	return true;
}

static bool check_connection(struct route *r, const struct gp_ledge *l)
{
	char a[32], b[32], c[32];
	int64_t gap = l->pitch - l->pad_width;
	if (l->connection == GP_LEDGE_PINS &&
	    l->pitch != l->connector_pitch)
		return gp_diag_error(r->diag, &l->where,
				     "ledge '%s': pad pitch %s mm differs "
				     "from the pin pitch %s mm; pins need "
				     "pads at their own pitch",
				     l->name, mm(a, l->pitch),
				     mm(b, l->connector_pitch));
	if (l->connection == GP_LEDGE_HEAT_SEAL && l->connector_pitch &&
	    l->pitch < l->connector_pitch)
		return gp_diag_error(r->diag, &l->where,
				     "ledge '%s': pad pitch %s mm is finer "
				     "than the heat-seal connector's "
				     "finest pitch %s mm",
				     l->name, mm(a, l->pitch),
				     mm(b, l->connector_pitch));
	/* Elastomeric strips: at least two conductors on a pad and no
	 * conductor bridging a gap (common practice, no published source). */
	if (l->connection == GP_LEDGE_ELASTOMERIC && l->connector_pitch &&
	    (l->pad_width < 2 * l->connector_pitch ||
	     gap < l->connector_pitch))
		return gp_diag_error(r->diag, &l->where,
				     "ledge '%s': pads %s mm wide with %s mm "
				     "gaps do not suit a %s mm conductor "
				     "pitch; expected pads of at least two "
				     "conductor pitches and gaps of at least "
				     "one",
				     l->name, mm(a, l->pad_width),
				     mm(b, gap), mm(c, l->connector_pitch));
	if (gap < r->min_space)
		return gp_diag_error(r->diag, &l->where,
				     "ledge '%s': pads %s mm wide at %s mm "
				     "pitch leave %s mm between pads, less "
				     "than the minimum space %s mm",
				     l->name, mm(a, l->pad_width),
				     mm(b, l->pitch), mm(c, gap),
				     mm(c + 0, r->min_space));
	return true;
}

/* The connection a ledge is laid out for should be the one the ordering
 * spec names (optics.connection): a warning when they differ. */
static void compare_connection(struct route *r, const struct gp_ledge *l)
{
	static const enum gp_connection as_ordered[] = {
		[GP_LEDGE_ELASTOMERIC] = GP_CONNECTION_ELASTOMERIC,
		[GP_LEDGE_PINS] = GP_CONNECTION_PINS,
		[GP_LEDGE_HEAT_SEAL] = GP_CONNECTION_HEAT_SEAL,
	};
	static const char *const ledge_names[] = { "elastomeric", "pins",
						   "heat_seal" };
	static const char *const optics_names[] = { "", "elastomeric", "pins",
						    "heat-seal" };
	enum gp_connection ordered = r->design->drive.connection;
	if (ordered == GP_CONNECTION_UNSET ||
	    as_ordered[l->connection] == ordered)
		return;
	gp_diag_warning(r->diag,
			l->connection_where.file ? &l->connection_where
						 : &l->where,
			"ledge '%s' is laid out for connection method %s%s, but "
			"'optics.connection' orders %s; make them agree",
			l->name, ledge_names[l->connection],
			l->connection_where.file ? "" : " (the default)",
			optics_names[ordered]);
}

/* --- candidates -------------------------------------------------------------- */

static bool is_block_net(const struct gp_build *b, int net, bool *common,
			 int *row, int *rows)
{
	for (size_t i = 0; i < b->design->block_count; i++) {
		const struct gp_block_nets *n = &b->blocks[i];
		if (b->design->blocks[i].commons_from < 0 &&
		    net >= n->first_common &&
		    net < n->first_common + n->common_count) {
			*common = true;
			*row = net - n->first_common;
			*rows = (int)n->common_count;
			return true;
		}
		if (net >= n->first_segment &&
		    net < n->first_segment + n->segment_count) {
			*common = false;
			return true;
		}
	}
	return false;
}

/* Adds an end; the per-end arrays grow together.  False when out of
 * memory (no end is dropped). */
static bool add_cand(struct netstate *n, enum gp_side side,
		     struct gp_point at, int64_t width)
{
	if (n->cand_count == n->cand_capacity) {
		int cap = n->cand_capacity ? 2 * n->cand_capacity : 16;
		struct cand *c = realloc(n->cands, (size_t)cap * sizeof(*c));
		if (c)
			n->cands = c;
		int *o = c ? realloc(n->order, (size_t)cap * sizeof(*o)) : NULL;
		if (o)
			n->order = o;
		bool *b = o ? realloc(n->bend, (size_t)cap * sizeof(*b)) : NULL;
		if (b)
			n->bend = b;
		bool *x = b ? realloc(n->banned, (size_t)cap * sizeof(*x)) : NULL;
		if (!x)
			return false;
		n->banned = x;
		n->cand_capacity = cap;
	}
	n->bend[n->cand_count] = n->banned[n->cand_count] = false;
	n->cands[n->cand_count++] = (struct cand){ side, at, width, 0, false,
						   gp_box_none() };
	return true;
}

static void free_cands(struct netstate *n)
{
	free(n->cands);
	free(n->order);
	free(n->bend);
	free(n->banned);
}

/* The strip of a block net: its longest electrode (icons sharing the
 * net add pieces of their own, and their bridges, round it). */
static struct gp_box strip_box(const struct route *r, int net, bool common)
{
	const struct gp_artwork *art = &r->build->art;
	enum gp_layer layer = gp_plate_ito_layer(art->nets[net].plate);
	struct gp_box best = gp_box_none();
	int64_t most = -1;
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->net != net || s->layer != layer ||
		    s->role != GP_ROLE_ELECTRODE)
			continue;
		struct gp_box b = gp_polygon_bounds(&s->poly);
		int64_t run = common ? b.x1 - b.x0 : b.y1 - b.y0;
		if (run > most)
			most = run, best = b;
	}
	return best;
}

static int64_t shift_reach(const struct route *r);

/* A block row's common may also leave from either end of its strip a
 * short way sideways and then turn toward its ledge, when that is above
 * or below the block: the rows nearer the ledge turn first, so that the
 * turns nest and no lead crosses another.  These ends are offered only
 * when the straight ones cannot all be chosen (struct route, turning). */
static bool turning_cands(struct route *r, struct netstate *n,
			  struct gp_box strip)
{
	enum gp_side ledge = r->ledges[n->ledge].side;
	if (ledge != GP_SIDE_BOTTOM && ledge != GP_SIDE_TOP)
		return true;
	int64_t w = min64(r->g->leads.width, r->ledges[n->ledge].pad_width);
	w = max64(w, r->design->rules.min_line);
	int64_t pitch = w + r->space;
	int nearer = ledge == GP_SIDE_BOTTOM ? n->block_rows - 1 - n->block_row
					     : n->block_row;
	int64_t g = max64(max64(r->space, r->min_space), shift_reach(r)) + w +
		    nearer * pitch;
	int64_t y = (strip.y0 + strip.y1) / 2;
	int64_t x[2] = { strip.x0 - g, strip.x1 + g };
	for (int k = 0; k < 2; k++) {
		if (!add_cand(n, ledge, (struct gp_point){ x[k], y }, w))
			return false;
		struct cand *c = &n->cands[n->cand_count - 1];
		c->turn = true;
		c->turn_stub = k == 0 ? gp_box_make(x[k] - w / 2, y - w / 2,
						    strip.x0 + w, y + w - w / 2)
				      : gp_box_make(strip.x1 - w, y - w / 2,
						    x[k] + w - w / 2, y + w - w / 2);
	}
	return true;
}

/* Ends of block strips come from the strips themselves. */
static bool block_cands(struct route *r, int net, struct netstate *n)
{
	bool common = false;
	int row = 0, rows = 1;
	if (!is_block_net(r->build, net, &common, &row, &rows))
		return true;
	struct gp_box b = strip_box(r, net, common);
	if (gp_box_is_empty(b))
		b = n->centre;
	if (common) {
		int64_t y = (b.y0 + b.y1) / 2, h = b.y1 - b.y0;
		n->block_common = true;
		n->block_row = row;
		n->block_rows = rows;
		return add_cand(n, GP_SIDE_LEFT, (struct gp_point){ b.x0, y }, h) &&
		       add_cand(n, GP_SIDE_RIGHT, (struct gp_point){ b.x1, y }, h) &&
		       turning_cands(r, n, b);
	}
	int64_t x = (b.x0 + b.x1) / 2, w = b.x1 - b.x0;
	return add_cand(n, GP_SIDE_BOTTOM, (struct gp_point){ x, b.y0 }, w) &&
	       add_cand(n, GP_SIDE_TOP, (struct gp_point){ x, b.y1 }, w);
}

/* Any other electrode: leave from its outermost point on each side, or
 * from the outermost point of its first or last third along that side
 * (so that an icon's front electrode and its back patch, whose outermost
 * points line up, can leave side by side); each starts a little inside
 * the electrode so that lead and electrode share area. */
struct extreme {
	struct gp_point p;
	struct gp_box box;        /* bounds of the shape it is on */
	bool found;
};

static void consider(struct extreme *e, struct gp_point p, enum gp_side side,
		     struct gp_box box)
{
	bool better = !e->found;
	switch (side) {
	case GP_SIDE_BOTTOM: better |= p.y < e->p.y; break;
	case GP_SIDE_TOP: better |= p.y > e->p.y; break;
	case GP_SIDE_LEFT: better |= p.x < e->p.x; break;
	default: better |= p.x > e->p.x; break;
	}
	if (better)
		e->p = p, e->box = box, e->found = true;
}

static bool shape_cands(struct route *r, int net, struct netstate *n)
{
	const struct gp_artwork *art = &r->build->art;
	enum gp_layer layer = gp_plate_ito_layer(art->nets[net].plate);
	struct gp_box b = gp_box_none();
	for (size_t i = 0; i < art->shape_count; i++)
		if (art->shapes[i].net == net && art->shapes[i].layer == layer)
			b = gp_box_union(b, gp_polygon_bounds(&art->shapes[i].poly));
	if (gp_box_is_empty(b))
		return true;
	/* [side][0 whole, 1 first third, 2 last third] */
	struct extreme e[GP_SIDE_COUNT][3];
	memset(e, 0, sizeof(e));
	int64_t w3 = (b.x1 - b.x0) / 3, h3 = (b.y1 - b.y0) / 3;
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->net != net || s->layer != layer)
			continue;
		const struct gp_ring *o = &s->poly.outer;
		struct gp_box sbox = gp_polygon_bounds(&s->poly);
		/* middles of flat edges first: of equally outermost points
		 * the first is kept, and a lead from the middle of a flat
		 * side has room on both hands */
		for (size_t k = 0; k < 2 * o->count; k++) {
			struct gp_point p = o->points[k % o->count];
			if (k < o->count) {
				struct gp_point q = o->points[(k + 1) % o->count];
				if (p.x != q.x && p.y != q.y)
					continue;
				p = (struct gp_point){ p.x + (q.x - p.x) / 2,
						       p.y + (q.y - p.y) / 2 };
			}
			for (int d = 0; d < GP_SIDE_COUNT; d++) {
				bool across = d == GP_SIDE_BOTTOM || d == GP_SIDE_TOP;
				int64_t at = across ? p.x - b.x0 : p.y - b.y0;
				int64_t third = across ? w3 : h3;
				consider(&e[d][0], p, (enum gp_side)d, sbox);
				if (at <= third)
					consider(&e[d][1], p, (enum gp_side)d, sbox);
				if (at >= 2 * third)
					consider(&e[d][2], p, (enum gp_side)d, sbox);
			}
		}
	}
	int64_t w = r->g->leads.width;
	int64_t depth = min64(w, r->design->rules.registration / 2);
	depth = min64(depth, min64(b.x1 - b.x0, b.y1 - b.y0) / 4);
	static const enum gp_side order[] = { GP_SIDE_BOTTOM, GP_SIDE_LEFT,
					      GP_SIDE_RIGHT, GP_SIDE_TOP };
	for (int k = 0; k < 4; k++) {
		for (int t = 0; t < 3; t++) {
			if (!e[order[k]][t].found)
				continue;
			struct gp_point p = e[order[k]][t].p;
			/* a whole lead's width inside the shape across */
			struct gp_box sb = e[order[k]][t].box;
			bool across = order[k] == GP_SIDE_BOTTOM ||
				      order[k] == GP_SIDE_TOP;
			int64_t lo = (across ? sb.x0 : sb.y0) + w;
			int64_t hi = (across ? sb.x1 : sb.y1) - w;
			int64_t *v = across ? &p.x : &p.y;
			if (lo <= hi)
				*v = *v < lo ? lo : *v > hi ? hi : *v;
			switch (order[k]) {
			case GP_SIDE_BOTTOM: p.y += depth; break;
			case GP_SIDE_TOP: p.y -= depth; break;
			case GP_SIDE_LEFT: p.x += depth; break;
			default: p.x -= depth; break;
			}
			if (!add_cand(n, order[k], p, w))
				return false;
		}
	}
	return true;
}

static bool has_port(const struct route *r, int net)
{
	for (size_t i = 0; i < r->build->digit_row_count; i++) {
		const struct gp_digit_row *row = &r->build->digit_rows[i];
		for (size_t k = 0; k < row->port_count; k++)
			if (row->ports[k].net == net)
				return true;
	}
	return false;
}

/* Point in polygon (even-odd over all rings; on the edge counts as
 * either). */
static bool point_in(const struct gp_polygon *p, struct gp_point q)
{
	bool in = false;
	for (size_t r = 0; r <= p->hole_count; r++) {
		const struct gp_ring *ring = r ? &p->holes[r - 1] : &p->outer;
		for (size_t k = 0, j = ring->count - 1; k < ring->count; j = k++) {
			struct gp_point a = ring->points[k], b = ring->points[j];
			if ((a.y > q.y) != (b.y > q.y) &&
			    (double)q.x < (double)(b.x - a.x) * (double)(q.y - a.y) /
						  (double)(b.y - a.y) +
					  (double)a.x)
				in = !in;
		}
	}
	return in;
}

/* A lead that starts in a back patch reaches on into it, past the margin
 * that notches round other nets' front leads may take, when the patch is
 * there to take it. */
static void set_reach(struct route *r, int net, struct cand *c)
{
	const struct gp_artwork *art = &r->build->art;
	/* off the patch's corner: a lead's width in from its sides */
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->net != net || s->role != GP_ROLE_PATCH ||
		    !point_in(&s->poly, c->at))
			continue;
		struct gp_box sb = gp_polygon_bounds(&s->poly);
		bool across = c->side == GP_SIDE_BOTTOM || c->side == GP_SIDE_TOP;
		int64_t w = c->width;
		int64_t lo = (across ? sb.x0 : sb.y0) + w;
		int64_t hi = (across ? sb.x1 : sb.y1) - w;
		struct gp_point q = c->at;
		int64_t *v = across ? &q.x : &q.y;
		if (lo <= hi)
			*v = *v < lo ? lo : *v > hi ? hi : *v;
		if (point_in(&s->poly, q))
			c->at = q;
		break;
	}
	int64_t want = r->design->rules.registration + r->g->leads.width;
	struct gp_point far = c->at;
	switch (c->side) {
	case GP_SIDE_BOTTOM: far.y += want; break;
	case GP_SIDE_TOP: far.y -= want; break;
	case GP_SIDE_LEFT: far.x += want; break;
	default: far.x -= want; break;
	}
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->net != net || s->role != GP_ROLE_PATCH)
			continue;
		if (point_in(&s->poly, c->at) && point_in(&s->poly, far)) {
			c->reach = want;
			return;
		}
	}
}

#define EDGE_PROBE 10  /* nm */

static void set_reaches(struct route *r)
{
	bool *has = calloc(r->net_count + 1, sizeof(*has));
	if (!has)
		return;   /* only a refinement */
	for (size_t i = 0; i < r->build->art.shape_count; i++) {
		const struct gp_shape *s = &r->build->art.shapes[i];
		if (s->role == GP_ROLE_PATCH && s->net >= 0 &&
		    (size_t)s->net < r->net_count)
			has[s->net] = true;
	}
	const struct gp_artwork *art = &r->build->art;
	for (size_t i = 0; i < r->net_count; i++) {
		struct netstate *n = &r->nets[i];
		n->patch = has[i];
		if (!has[i])
			continue;
		/* ends offered before a bus notched the patch may lie where
		 * the patch is no more */
		int kept = 0;
		for (int k = 0; k < n->cand_count; k++) {
			/* an end on the electrode's edge (a strip's end) is on
			 * it: tested a little way inside */
			struct gp_point at = n->cands[k].at, in = at;
			switch (n->cands[k].side) {
			case GP_SIDE_BOTTOM: in.y += EDGE_PROBE; break;
			case GP_SIDE_TOP: in.y -= EDGE_PROBE; break;
			case GP_SIDE_LEFT: in.x += EDGE_PROBE; break;
			default: in.x -= EDGE_PROBE; break;
			}
			bool on = false;
			for (size_t s = 0; s < art->shape_count && !on; s++)
				on = art->shapes[s].net == (int)i &&
				     art->shapes[s].layer ==
					     gp_plate_ito_layer(art->nets[i].plate) &&
				     (point_in(&art->shapes[s].poly, at) ||
				      point_in(&art->shapes[s].poly, in));
			if (on)
				n->cands[kept++] = n->cands[k];
		}
		n->cand_count = kept;
		for (int k = 0; k < n->cand_count; k++)
			set_reach(r, (int)i, &n->cands[k]);
	}
	free(has);
}

/* Bounds of each net's electrodes as laid out (before any joining bus). */
static void net_centres(struct route *r)
{
	const struct gp_artwork *art = &r->build->art;
	for (size_t i = 0; i < r->net_count; i++)
		r->nets[i].centre = gp_box_none();
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->net < 0 || (size_t)s->net >= r->net_count ||
		    s->role == GP_ROLE_PATCH)
			continue;
		r->nets[s->net].centre = gp_box_union(
			r->nets[s->net].centre, gp_polygon_bounds(&s->poly));
	}
}

static bool collect_cands(struct route *r)
{
	bool ok = true;
	for (size_t i = 0; ok && i < r->build->end_count; i++) {
		const struct gp_lead_end *e = &r->build->ends[i];
		if (e->net >= 0 && (size_t)e->net < r->net_count)
			ok = add_cand(&r->nets[e->net], e->side, e->at,
				      e->width);
	}
	for (size_t i = 0; ok && i < r->build->digit_row_count; i++) {
		const struct gp_digit_row *row = &r->build->digit_rows[i];
		for (size_t k = 0; ok && k < row->port_count; k++) {
			const struct gp_digit_port *p = &row->ports[k];
			if (p->net >= 0 && (size_t)p->net < r->net_count)
				ok = add_cand(&r->nets[p->net], GP_SIDE_BOTTOM,
					      p->at, p->width);
		}
	}
	for (size_t i = 0; ok && i < r->net_count; i++)
		if (r->nets[i].cand_count == 0)
			ok = block_cands(r, (int)i, &r->nets[i]);
	/* every other net may also leave from its outer points (after the
	 * ends its layout offered) */
	for (size_t i = 0; ok && i < r->net_count; i++) {
		bool common = false;
		int row, rows;
		if (!is_block_net(r->build, (int)i, &common, &row, &rows) &&
		    !has_port(r, (int)i))
			ok = shape_cands(r, (int)i, &r->nets[i]);
	}
	if (!ok)
		return gp_diag_oom(r->diag, NULL);
	set_reaches(r);
	return true;
}

/* --- corridors ------------------------------------------------------------- */

/* Where the wide part of a lead leaving at `at` towards side ends: the
 * seal's outer edge pushed out by ext. */
static struct gp_box corridor_box(const struct route *r, const struct cand *c,
				  int64_t ext)
{
	int64_t h0 = c->width / 2, h1 = c->width - c->width / 2;
	struct gp_box o = r->s_out;
	switch (c->side) {
	case GP_SIDE_BOTTOM:
		return gp_box_make(c->at.x - h0, o.y0 - ext, c->at.x + h1,
				   c->at.y);
	case GP_SIDE_TOP:
		return gp_box_make(c->at.x - h0, c->at.y, c->at.x + h1,
				   o.y1 + ext);
	case GP_SIDE_LEFT:
		return gp_box_make(o.x0 - ext, c->at.y - h0, c->at.x,
				   c->at.y + h1);
	default:
		return gp_box_make(c->at.x, c->at.y - h0, o.x1 + ext,
				   c->at.y + h1);
	}
}

struct gp_box gp_route_corridor(const struct route *r, const struct cand *c,
				int64_t ext)
{
	return corridor_box(r, c, ext);
}

int64_t gp_route_lead_width(const struct route *r, const struct netstate *n,
			    const struct cand *c)
{
	int64_t w = min64(r->g->leads.width, c->width);
	w = min64(w, r->ledges[n->ledge].pad_width);
	return max64(w, r->design->rules.min_line);
}

/* The first stretch of a lead from c, length long, as wide as the lead. */
static struct gp_box stub_box(const struct route *r, const struct netstate *n,
			      const struct cand *c, int64_t length)
{
	int64_t w = gp_route_lead_width(r, n, c);
	int64_t h0 = w / 2, h1 = w - w / 2;
	struct gp_point a = c->at;
	switch (c->side) {
	case GP_SIDE_BOTTOM:
		return gp_box_make(a.x - h0, a.y - length, a.x + h1, a.y + c->reach);
	case GP_SIDE_TOP:
		return gp_box_make(a.x - h0, a.y - c->reach, a.x + h1, a.y + length);
	case GP_SIDE_LEFT:
		return gp_box_make(a.x - length, a.y - h0, a.x + c->reach, a.y + h1);
	default:
		return gp_box_make(a.x - c->reach, a.y - h0, a.x + length, a.y + h1);
	}
}

/* Squared distance between boxes, in nm^2 as double. */
static double box_gap2(struct gp_box a, struct gp_box b)
{
	double dx = (double)max64(0, max64(a.x0 - b.x1, b.x0 - a.x1));
	double dy = (double)max64(0, max64(a.y0 - b.y1, b.y0 - a.y1));
	return dx * dx + dy * dy;
}

static bool shape_is_box(const struct gp_shape *s)
{
	const struct gp_ring *o = &s->poly.outer;
	if (s->poly.hole_count || o->count != 4)
		return false;
	for (size_t i = 0; i < 4; i++) {
		struct gp_point a = o->points[i], b = o->points[(i + 1) % 4];
		if (a.x != b.x && a.y != b.y)
			return false;
	}
	return true;
}

struct blocker {
	struct route *r;
	struct gp_geos *geos;
	int net;
	enum gp_plate plate;
	struct gp_box box;
	int hit;                  /* net that blocks, or -1 */
	bool plate_hit;           /* on the other plate */
	bool all;                 /* find every blocker, not the first */
	struct gp_box hits;       /* bounds of the blockers found */
};

static bool shape_overlaps(struct blocker *k, const struct gp_shape *s,
			   struct gp_box box)
{
	struct gp_geos_shape *a = gp_geos_shape_from_polygon(k->geos, &s->poly);
	struct gp_geos_shape *b = gp_geos_shape_from_box(k->geos, box);
	bool hit = true;
	if (a && b)
		hit = gp_geos_shape_overlaps_area(k->geos, b, a);
	gp_geos_shape_destroy(k->geos, a);
	gp_geos_shape_destroy(k->geos, b);
	return hit;
}

static bool shape_nearer(struct blocker *k, const struct gp_shape *s,
			 int64_t gap)
{
	struct gp_geos_shape *a = gp_geos_shape_from_polygon(k->geos, &s->poly);
	struct gp_geos_shape *b = gp_geos_shape_from_box(k->geos, k->box);
	double d = 0;
	if (a && b && !gp_geos_shape_distance(k->geos, b, a, &d))
		d = 0;
	gp_geos_shape_destroy(k->geos, a);
	gp_geos_shape_destroy(k->geos, b);
	return d < (double)gap;
}

static void hit_test(struct blocker *k, const struct gp_shape *s);

static void visit_blocker(void *user, size_t item)
{
	struct blocker *k = user;
	const struct gp_shape *s = &k->r->build->art.shapes[item];
	if ((k->hit >= 0 && !k->all) || s->net == k->net || s->net < 0)
		return;
	int was = k->hit;
	k->hit = -1;
	hit_test(k, s);
	if (k->hit >= 0)
		k->hits = gp_box_union(k->hits, gp_polygon_bounds(&s->poly));
	else
		k->hit = was;
}

static void hit_test(struct blocker *k, const struct gp_shape *s)
{
	enum gp_plate plate = s->layer == GP_LAYER_FRONT_ITO ? GP_PLATE_FRONT
							     : GP_PLATE_BACK;
	struct gp_box b = gp_polygon_bounds(&s->poly);
	/* Bounds are exact for boxes; other shapes are asked of GEOS. */
	if (plate != k->plate) {
		/* a back patch gives way: it is notched round the lead */
		if (s->role == GP_ROLE_PATCH)
			return;
		struct gp_box inner = k->box;
		if (!gp_box_overlap(inner, k->r->s_in) || !gp_box_overlap(b, inner))
			return;
		if (shape_is_box(s) || shape_overlaps(k, s, inner))
			k->hit = s->net, k->plate_hit = true;
	} else {
		double gap = (double)k->r->min_space;
		if (box_gap2(b, k->box) < gap * gap &&
		    (shape_is_box(s) || shape_nearer(k, s, k->r->min_space)))
			k->hit = s->net, k->plate_hit = false;
	}
}

/* Rank of a candidate: towards the ledge first, the far side last. */
static int cand_rank(const struct route *r, const struct netstate *n,
		     const struct cand *c)
{
	const struct gp_ledge *l = &r->ledges[n->ledge];
	enum gp_side s = side_to_canon(l->side, c->side);
	int rank = s == GP_SIDE_BOTTOM ? 0 : s == GP_SIDE_TOP ? 4 : 2;
	enum gp_side way = c->side;
	if (c->turn)
		way = c->turn_stub.x1 > c->at.x + c->width ? GP_SIDE_LEFT
							   : GP_SIDE_RIGHT;
	if (n->block_common && (way == GP_SIDE_LEFT || way == GP_SIDE_RIGHT)) {
		enum gp_commons_exit e = r->g->leads.commons;
		if (e == GP_COMMONS_AUTO)
			e = l->side == GP_SIDE_LEFT    ? GP_COMMONS_LEFT
			    : l->side == GP_SIDE_RIGHT ? GP_COMMONS_RIGHT
						       : GP_COMMONS_SPLIT;
		if (e == GP_COMMONS_SPLIT)
			e = n->block_row < (n->block_rows + 1) / 2
				    ? GP_COMMONS_LEFT
				    : GP_COMMONS_RIGHT;
		bool want_left = e == GP_COMMONS_LEFT;
		rank = (way == GP_SIDE_LEFT) == want_left ? 1 : 3;
	}
	if (n->has_pad && (s == GP_SIDE_LEFT || s == GP_SIDE_RIGHT)) {
		/* with a pin map, leave towards the pad */
		const struct gp_pin *pin = &r->build->pins[n->pin];
		struct gp_point pc = to_canon(l->side, pin->centre);
		struct gp_point ec = to_canon(
			l->side, (struct gp_point){
					 (n->centre.x0 + n->centre.x1) / 2,
					 (n->centre.y0 + n->centre.y1) / 2 });
		bool left = pc.x < ec.x;
		rank = (s == GP_SIDE_LEFT) == left ? 1 : 3;
	}
	return rank;
}

static int64_t transfer_zone(const struct route *r)
{
	const struct gp_transfer_spec *t = &r->g->transfers;
	return t->count * (t->size + t->margin) + t->margin;
}

static int64_t stub_length(const struct route *r, const struct netstate *n,
			   const struct cand *c);

/* Checks one end: the box of its way out, against what is there. */
static bool blocked(struct route *r, struct gp_geos_index *index,
		    struct blocker *k, struct gp_box box)
{
	k->box = box;
	k->hit = -1;
	k->hits = gp_box_none();
	struct gp_box q = box;
	q.x0 -= r->min_space, q.y0 -= r->min_space;
	q.x1 += r->min_space, q.y1 += r->min_space;
	return gp_geos_index_query(index, q, visit_blocker, k);
}

/* A lead toward the ledge whose straight way is blocked further on goes
 * round (route-bundle.c) when that is a short way aside compared with the
 * room above the blockers: the nearer end of what blocks it (grown by
 * what touches it) no further aside than half the way down to it. */
static bool worth_bending(const struct route *r, const struct netstate *n,
			  const struct cand *c, struct gp_box hits)
{
	const struct gp_artwork *art = &r->build->art;
	enum gp_side side = r->ledges[n->ledge].side;
	struct gp_box h = box_map(hits, side, true);
	int64_t g = r->space + r->g->leads.width;
	for (int round = 0; round < 8; round++) {
		bool grew = false;
		for (size_t i = 0; i < art->shape_count; i++) {
			const struct gp_shape *s = &art->shapes[i];
			if ((s->layer != GP_LAYER_FRONT_ITO &&
			     s->layer != GP_LAYER_BACK_ITO) || s->net < 0)
				continue;
			struct gp_box b = box_map(gp_polygon_bounds(&s->poly),
						  side, true);
			if (b.y1 < h.y0 || b.y0 > h.y1 || b.x1 < h.x0 - g ||
			    b.x0 > h.x1 + g ||
			    (b.x0 >= h.x0 && b.x1 <= h.x1))
				continue;
			h = gp_box_union(h, b);
			grew = true;
		}
		if (!grew)
			break;
	}
	struct gp_point at = to_canon(side, c->at);
	int64_t aside = min64(at.x - h.x0, h.x1 - at.x) + g;
	return aside <= (at.y - h.y1) / 2;
}

/* The description's place of the element a net belongs to (a block, a
 * digit row, an icon), for routing messages; NULL when none. */
const struct gp_where *gp_route_net_where(const struct route *r, int net)
{
	const struct gp_build *b = r->build;
	const struct gp_design *d = r->design;
	for (size_t i = 0; b->blocks && i < d->block_count; i++) {
		const struct gp_block_nets *n = &b->blocks[i];
		if ((net >= n->first_common &&
		     net < n->first_common + n->common_count) ||
		    (net >= n->first_segment &&
		     net < n->first_segment + n->segment_count))
			return &d->blocks[i].where;
	}
	for (size_t i = 0; i < b->digit_row_count; i++) {
		const struct gp_digit_row *row = &b->digit_rows[i];
		if ((net >= row->first_common &&
		     net < row->first_common + row->common_count) ||
		    (net >= row->first_segment &&
		     net < row->first_segment + row->segment_count))
			return &d->digits[i].where;
	}
	for (size_t i = 0; i < b->art.pixel_count; i++) {
		const struct gp_pixel *px = &b->art.pixels[i];
		if (px->owner_kind == GP_OWNER_ICON &&
		    (px->common == net || px->segment == net) &&
		    px->owner >= 0 && (size_t)px->owner < d->icon_count)
			return &d->icons[px->owner].where;
	}
	return NULL;
}

/* Candidates of a net ranked, each either free of the shapes already
 * there or not; n->order[0..n->usable) are the free ones, best first:
 * by rank, a straight way before one that goes round, and of equal
 * ones an end that reaches into its patch (see set_reach) first. */
static bool rank_ends(struct route *r, struct gp_geos_index *index,
		      struct gp_geos *geos, int net)
{
	struct netstate *n = &r->nets[net];
	const struct gp_ledge *l = &r->ledges[n->ledge];
	enum gp_plate plate = r->build->art.nets[net].plate;
	n->transfer = plate != l->plate;
	n->ext = r->g->transfers.outside ? transfer_zone(r) : 0;
	struct blocker k = { .r = r, .geos = geos, .net = net, .plate = plate };
	int *key = malloc((size_t)(n->cand_count ? n->cand_count : 1) *
			  sizeof(*key));
	int *order = n->order;
	if (!key)
		return gp_diag_oom(r->diag, NULL);
	n->first_hit = -1;
	int first_bad = -1, bad_key = 0;
	for (int c = 0; c < n->cand_count; c++) {
		const struct cand *cd = &n->cands[c];
		bool down = side_to_canon(l->side, cd->side) == GP_SIDE_BOTTOM;
		struct cand narrow = *cd;
		if (down)
			narrow.width = gp_route_lead_width(r, n, cd);
		k.all = down;
		if (!blocked(r, index, &k, corridor_box(r, &narrow, n->ext)))
			goto fail;
		if (n->banned[c] || (cd->turn && !r->turning)) {
			key[c] = -1;
			continue;
		}
		if (cd->turn && k.hit < 0) {
			/* its way sideways, before it turns */
			if (!blocked(r, index, &k, cd->turn_stub))
				goto fail;
		}
		if (cd->turn && k.hit < 0) {
			key[c] = 4 * cand_rank(r, n, cd) + 3;
			n->bend[c] = false;
			continue;
		}
		if (cd->turn) {
			key[c] = -1;
			continue;
		}
		int rank = cand_rank(r, n, cd);
		int extra = n->patch && cd->reach == 0;
		n->bend[c] = false;
		key[c] = 4 * rank + extra;
		if (k.hit < 0)
			continue;
		struct gp_box hits = k.hits;
		int hit = k.hit;
		bool plate_hit = k.plate_hit;
		k.all = false;
		if (down && !blocked(r, index, &k,
				     stub_box(r, n, cd, stub_length(r, n, cd))))
			goto fail;
		if (down && k.hit < 0 && !n->no_bend) {
			n->bend[c] = true;
			key[c] = worth_bending(r, n, cd, hits) ? 4 * rank + 2 + extra
							       : 4 * 5 + 2 + extra;
			continue;
		}
		if (first_bad < 0 || key[c] < bad_key) {
			n->first_hit = hit, n->first_hit_plate = plate_hit;
			first_bad = c;
			bad_key = key[c];
		}
		key[c] = -1;
	}
	int m = 0;
	for (int c = 0; c < n->cand_count; c++)
		if (key[c] >= 0)
			order[m++] = c;
	for (int a = 1; a < m; a++)
		for (int j = a; j > 0 && key[order[j]] < key[order[j - 1]]; j--) {
			int t = order[j];
			order[j] = order[j - 1];
			order[j - 1] = t;
		}
	n->usable = m;
	free(key);
	if (n->cand_count == 0) {
		char x[32], y[32];
		struct gp_box b = n->centre;
		return gp_diag_error(r->diag, gp_route_net_where(r, net),
				     "net %s (x %s, y %s mm) has no place to "
				     "lead it out: its electrode offers no "
				     "end; give it a ledge on another side or "
				     "move it off the others", net_name(r, net),
				     mm(x, (b.x0 + b.x1) / 2),
				     mm(y, (b.y0 + b.y1) / 2));
	}
	if (n->usable == 0) {
		char x[32], y[32];
		const struct cand *c = &n->cands[first_bad];
		return gp_diag_error(
			r->diag, gp_route_net_where(r, net),
			"the lead-out of %s from (%s, %s) mm towards the %s "
			"is blocked by %s on the %s plate, and so is every other "
			"way out; move %s's element off %s's, or add a ledge on "
			"another side",
			net_name(r, net), mm(x, c->at.x),
			mm(y, c->at.y), gp_side_name(c->side),
			net_name(r, n->first_hit),
			n->first_hit_plate ? "other" : "same",
			net_name(r, net), net_name(r, n->first_hit));
	}
	n->pick = 0;
	return true;
fail:
	free(key);
	return false;
}

/* What a chosen end occupies: its corridor on the electrode plate, and on
 * the ledge plate where the narrow lead starts (and the transfer pad). */
struct footprint {
	int net;
	enum gp_plate plate;
	struct gp_box box;
	bool corridor;            /* inside the seal: other plate must not
				   * overlap it */
	bool wide;                /* electrode-like: min_space applies */
	/* 0: a straight lead; 1: where a lead toward the ledge starts;
	 * 2: the straight way of such a lead, which it may leave to go round
	 * other leads toward the ledge but not a straight lead crossing it */
	int kind;
};

static void set_choice(struct route *r, int net)
{
	struct netstate *n = &r->nets[net];
	n->chosen = n->order[n->pick];
	const struct cand *c = &n->cands[n->chosen];
	n->corridor = corridor_box(r, c, n->ext);
	switch (c->side) {
	case GP_SIDE_BOTTOM: n->corridor.y1 += c->reach; break;
	case GP_SIDE_TOP: n->corridor.y0 -= c->reach; break;
	case GP_SIDE_LEFT: n->corridor.x1 += c->reach; break;
	default: n->corridor.x0 -= c->reach; break;
	}
	n->bundle = side_to_canon(r->ledges[n->ledge].side, c->side) ==
		    GP_SIDE_BOTTOM;
}

static int64_t stub_length(const struct route *r, const struct netstate *n,
			   const struct cand *c)
{
	return max64(r->min_space, r->design->rules.registration) +
	       2 * gp_route_lead_width(r, n, c);
}

static size_t footprints(const struct route *r, int net, struct footprint *f)
{
	const struct netstate *n = &r->nets[net];
	const struct gp_ledge *l = &r->ledges[n->ledge];
	const struct cand *c = &n->cands[n->chosen];
	size_t count = 0;
	if (n->bundle) {
		/* where it starts; route-bundle.c spaces the rest */
		enum gp_plate plate = r->build->art.nets[net].plate;
		struct cand narrow = *c;
		narrow.width = gp_route_lead_width(r, n, c);
		f[count++] = (struct footprint){
			net, plate, stub_box(r, n, c, stub_length(r, n, c)),
			true, true, 1 };
		f[count++] = (struct footprint){
			net, plate, corridor_box(r, &narrow, n->ext), true, true,
			2 };
		if (c->turn)
			f[count++] = (struct footprint){ net, plate, c->turn_stub,
							 true, true, 0 };
		return count;
	}
	f[count++] = (struct footprint){ net, r->build->art.nets[net].plate,
					 n->corridor, true, true, 0 };
	/* narrow lead just outside the seal, with its own space around */
	int64_t w = min64(r->g->leads.width, c->width);
	int64_t reach = n->ext + r->space + w;
	struct cand stub = *c;
	stub.width = w;
	struct gp_box box = corridor_box(r, &stub, n->ext);
	struct gp_box o = r->s_out;
	switch (c->side) {
	case GP_SIDE_BOTTOM: box = gp_box_make(box.x0, o.y0 - reach, box.x1, o.y0); break;
	case GP_SIDE_TOP: box = gp_box_make(box.x0, o.y1, box.x1, o.y1 + reach); break;
	case GP_SIDE_LEFT: box = gp_box_make(o.x0 - reach, box.y0, o.x0, box.y1); break;
	default: box = gp_box_make(o.x1, box.y0, o.x1 + reach, box.y1); break;
	}
	f[count++] = (struct footprint){ net, l->plate, box, false, false, 0 };
	if (n->transfer) {
		struct cand pad = *c;
		pad.width = r->g->transfers.size + 2 * r->g->transfers.margin;
		f[count++] = (struct footprint){ net, l->plate,
						 corridor_box(r, &pad, n->ext),
						 false, true, 0 };
	}
	return count;
}

/* Two footprints clash: same plate and nearer than the space that
 * applies, or other plates and overlapping inside the seal. */
/* What a plate shift within the registration can bring together: the
 * diagonal of the registration box. */
static int64_t shift_reach(const struct route *r)
{
	return (int64_t)ceil((double)r->design->rules.registration * SQRT2) +
	       r->design->rules.chord_tolerance;
}

static bool clash(const struct route *r, const struct footprint *a,
		  const struct footprint *b)
{
	if (a->net == b->net || (a->kind == 2 && b->kind) ||
	    (b->kind == 2 && a->kind))
		return false;
	if (a->plate == b->plate) {
		int64_t gap = a->wide && b->wide ? r->min_space : r->space;
		return box_gap2(a->box, b->box) < (double)gap * (double)gap;
	}
	if (a->kind == 1 && b->kind == 1) {
		/* two leads toward the ledge where they start: apart by
		 * what a plate shift can bring together */
		double g = (double)shift_reach(r);
		return box_gap2(a->box, b->box) < g * g;
	}
	if (!a->corridor || !b->corridor || !gp_box_overlap(a->box, b->box))
		return false;
	struct gp_box both = gp_box_make(max64(a->box.x0, b->box.x0),
					 max64(a->box.y0, b->box.y0),
					 min64(a->box.x1, b->box.x1),
					 min64(a->box.y1, b->box.y1));
	return gp_box_overlap(both, r->s_in);
}

/* Finds the first clash among the chosen ends; false on error. */
static bool first_clash(struct route *r, struct gp_geos *geos, int *na,
			int *nb, struct gp_box *where)
{
	size_t cap = 3 * r->net_count + 1, count = 0;
	struct footprint *f = malloc(cap * sizeof(*f));
	struct gp_box *boxes = malloc(cap * sizeof(*boxes));
	struct gp_index_pair *pairs = NULL;
	size_t pair_count = 0;
	bool ok = f && boxes;
	for (size_t i = 0; ok && i < r->net_count; i++)
		if (r->nets[i].ledge >= 0)
			count += footprints(r, (int)i, f + count);
	for (size_t i = 0; ok && i < count; i++)
		boxes[i] = f[i].box;
	int64_t gap = max64(max64(r->space, r->min_space), shift_reach(r));
	ok = ok && gp_geos_box_pairs(geos, boxes, count, gap, &pairs,
				     &pair_count);
	*na = *nb = -1;
	for (size_t p = 0; ok && p < pair_count && *na < 0; p++) {
		const struct footprint *a = &f[pairs[p].a], *b = &f[pairs[p].b];
		if (clash(r, a, b)) {
			*na = a->net < b->net ? a->net : b->net;
			*nb = a->net < b->net ? b->net : a->net;
			*where = gp_box_make(max64(a->box.x0, b->box.x0),
					     max64(a->box.y0, b->box.y0),
					     min64(a->box.x1, b->box.x1),
					     min64(a->box.y1, b->box.y1));
		}
	}
	free(pairs);
	free(f);
	free(boxes);
	return ok || gp_diag_oom(r->diag, NULL);
}

/* Of two clashing nets, the one to take its next free end: the one now
 * leaving a worse way (never trading a lead towards the ledge for one
 * that is not), the later one on a tie; -1 when neither may move. */
static int pick_mover(const struct route *r, int a, int b)
{
	const struct netstate *na = &r->nets[a], *nb = &r->nets[b];
	/* a lead that must go round things gives way before a straight one */
	int ra = cand_rank(r, na, &na->cands[na->chosen]) +
		 3 * na->bend[na->chosen];
	int rb = cand_rank(r, nb, &nb->cands[nb->chosen]) +
		 3 * nb->bend[nb->chosen];
	int left_a = na->usable - na->pick - 1, left_b = nb->usable - nb->pick - 1;
	if (ra == rb && left_a > 0 && left_a > left_b)
		return a;
	if (left_b > 0 && rb >= ra)
		return b;
	if (left_a > 0 && ra >= rb)
		return a;
	/* moving the one with the better way would trade it for worse,
	 * unless that way is not towards the ledge either */
	if (left_b > 0 && rb > 0)
		return b;
	if (left_a > 0 && ra > 0)
		return a;
	return -1;
}

/* --- the search for ends when trading gets stuck ------------------------------ */

/* When trading ends between two clashing nets gets stuck, a search picks
 * one free end per net: nets in order, ends best first; a net that runs
 * out of ends jumps back to the latest earlier net that caused one of its
 * clashes (conflict-directed backjumping), so that a chain of block
 * commons trading left and right ends is solved without trying every
 * combination. */
struct clash_link {
	int level, end;           /* a net's search level and its end */
	int other, other_end;     /* the end of another net it clashes with */
};

struct search {
	int *nets;                /* level -> net */
	int count;
	struct clash_link *links; /* sorted by level */
	size_t link_count, link_capacity;
	size_t *first;            /* level -> its first link; count + 1 */
	int *value;               /* level -> end (pick), -1 */
	uint64_t *conflicts;      /* level -> bitset of earlier levels */
	size_t words;
};

/* Enough for any glass seen; past it the search gives up (a finding,
 * not a hang). */
#define SEARCH_TRIES 200000

static int link_order(const void *a, const void *b)
{
	const struct clash_link *x = a, *y = b;
	if (x->level != y->level)
		return x->level < y->level ? -1 : 1;
	if (x->end != y->end)
		return x->end < y->end ? -1 : 1;
	return (x->other > y->other) - (x->other < y->other);
}

static bool add_link(struct search *s, int level, int end, int other,
		     int other_end)
{
	if (!gp_array_reserve(s->links, s->link_capacity, s->link_count + 1))
		return false;
	s->links[s->link_count++] =
		(struct clash_link){ level, end, other, other_end };
	return true;
}

/* Every pair of (net, end) that clash, both ways, grouped by level. */
static bool search_links(struct route *r, struct gp_geos *geos,
			 struct search *s)
{
	size_t cap = 1, count = 0;
	for (int v = 0; v < s->count; v++)
		cap += 4 * (size_t)r->nets[s->nets[v]].usable;
	struct footprint *f = malloc(cap * sizeof(*f));
	struct gp_box *boxes = malloc(cap * sizeof(*boxes));
	int *level = malloc(cap * sizeof(*level));
	int *end = malloc(cap * sizeof(*end));
	struct gp_index_pair *pairs = NULL;
	size_t pair_count = 0;
	bool ok = f && boxes && level && end;
	for (int v = 0; ok && v < s->count; v++) {
		int net = s->nets[v];
		struct netstate *n = &r->nets[net];
		int pick = n->pick;
		for (n->pick = 0; n->pick < n->usable; n->pick++) {
			set_choice(r, net);
			size_t got = footprints(r, net, f + count);
			for (size_t k = count; k < count + got; k++)
				boxes[k] = f[k].box, level[k] = v,
				end[k] = n->pick;
			count += got;
		}
		n->pick = pick;
		set_choice(r, net);
	}
	int64_t gap = max64(max64(r->space, r->min_space), shift_reach(r));
	ok = ok && gp_geos_box_pairs(geos, boxes, count, gap, &pairs,
				     &pair_count);
	for (size_t p = 0; ok && p < pair_count; p++) {
		size_t a = pairs[p].a, b = pairs[p].b;
		if (level[a] != level[b] && clash(r, &f[a], &f[b]))
			ok = add_link(s, level[a], end[a], level[b], end[b]) &&
			     add_link(s, level[b], end[b], level[a], end[a]);
	}
	if (ok && s->link_count)
		qsort(s->links, s->link_count, sizeof(*s->links), link_order);
	for (size_t i = 0, v = 0; ok && v <= (size_t)s->count; v++) {
		while (i < s->link_count && s->links[i].level < (int)v)
			i++;
		s->first[v] = i;
	}
	free(pairs);
	free(f);
	free(boxes);
	free(level);
	free(end);
	return ok;
}

/* The earliest level before `at` whose chosen end clashes with end `e`
 * of level `at`, or -1. */
static int clashes_with(const struct search *s, int at, int e)
{
	int worst = -1;
	for (size_t i = s->first[at]; i < s->first[at + 1]; i++) {
		const struct clash_link *k = &s->links[i];
		if (k->end == e && k->other < at &&
		    s->value[k->other] == k->other_end &&
		    (worst < 0 || k->other < worst))
			worst = k->other;
	}
	return worst;
}

static void set_bit(uint64_t *set, int bit)
{
	set[bit / 64] |= (uint64_t)1 << (bit % 64);
}

/* The latest level in a set, -1 when empty. */
static int latest(const uint64_t *set, size_t words)
{
	for (size_t w = words; w-- > 0;)
		if (set[w])
			return (int)(w * 64) + 63 - __builtin_clzll(set[w]);
	return -1;
}

/* Conflict-directed backjumping over s; true when every level has an
 * end (s->value), false when none exists or the tries ran out. */
static bool backjump(struct search *s, const struct route *r)
{
	long tries = SEARCH_TRIES;
	int at = 0;
	while (at >= 0 && at < s->count) {
		uint64_t *mine = s->conflicts + (size_t)at * s->words;
		int usable = r->nets[s->nets[at]].usable;
		int e = s->value[at] + 1;
		for (; e < usable && tries-- > 0; e++) {
			int by = clashes_with(s, at, e);
			if (by < 0)
				break;
			set_bit(mine, by);
		}
		if (tries <= 0)
			return false;
		if (e < usable) {
			s->value[at++] = e;
			continue;
		}
		/* out of ends: back to the latest level that caused a
		 * clash, handing it the rest of this level's causes */
		int back = latest(mine, s->words);
		if (back >= 0) {
			uint64_t *theirs = s->conflicts + (size_t)back * s->words;
			for (size_t w = 0; w < s->words; w++)
				theirs[w] |= mine[w];
			theirs[back / 64] &= ~((uint64_t)1 << (back % 64));
		}
		for (int v = back < 0 ? 0 : back + 1; v <= at; v++) {
			s->value[v] = -1;
			memset(s->conflicts + (size_t)v * s->words, 0,
			       s->words * sizeof(uint64_t));
		}
		at = back;
	}
	return at == s->count;
}

/* One end per net with no two clashing, by search; *found says whether
 * there was one (the nets' picks are then set).  False on error. */
static bool search_ends(struct route *r, struct gp_geos *geos, bool *found)
{
	struct search s = { 0 };
	*found = false;
	s.nets = malloc((r->net_count + 1) * sizeof(*s.nets));
	for (size_t i = 0; s.nets && i < r->net_count; i++)
		if (r->nets[i].ledge >= 0)
			s.nets[s.count++] = (int)i;
	s.words = (size_t)s.count / 64 + 1;
	s.first = malloc(((size_t)s.count + 1) * sizeof(*s.first));
	s.value = malloc(((size_t)s.count + 1) * sizeof(*s.value));
	s.conflicts = calloc(((size_t)s.count + 1) * s.words,
			     sizeof(*s.conflicts));
	bool ok = s.nets && s.first && s.value && s.conflicts &&
		  search_links(r, geos, &s);
	for (int v = 0; ok && v < s.count; v++)
		s.value[v] = -1;
	if (ok && backjump(&s, r)) {
		*found = true;
		for (int v = 0; v < s.count; v++) {
			r->nets[s.nets[v]].pick = s.value[v];
			set_choice(r, s.nets[v]);
		}
	}
	free(s.nets);
	free(s.first);
	free(s.value);
	free(s.conflicts);
	free(s.links);
	return ok || gp_diag_oom(r->diag, NULL);
}

/* Every net takes its best free end; while two clash, the one with
 * another free end (the later net first) moves to it. */
static bool choose_ends(struct route *r, struct gp_geos_index *index,
			struct gp_geos *geos)
{
	bool ok = true, searched = false;
	size_t rounds = 0;
	for (size_t i = 0; i < r->net_count; i++) {
		if (r->nets[i].ledge < 0)
			continue;
		if (!rank_ends(r, index, geos, (int)i))
			ok = false;
		else
			set_choice(r, (int)i);
		rounds += (size_t)r->nets[i].usable;
	}
	while (ok) {
		int a, b;
		struct gp_box where;
		if (!first_clash(r, geos, &a, &b, &where))
			return false;
		if (a < 0)
			return true;
		int move = pick_mover(r, a, b);
		if (move < 0 || rounds-- == 0) {
			bool found;
			if (!searched && !search_ends(r, geos, &found))
				return false;
			if (!searched && found) {
				searched = true;
				continue;
			}
			char x[32], y[32];
			return gp_diag_error(
				r->diag, gp_route_net_where(r, b),
				"the lead-outs of %s and %s come too close "
				"near (%s, %s) mm and neither has another way "
				"out; move one of the elements, or narrow "
				"'leads.width' and 'leads.space'",
				net_name(r, a), net_name(r, b), mm(x, where.x0),
				mm(y, where.y0));
		}
		r->nets[move].pick++;
		set_choice(r, move);
	}
	return ok;
}

/* --- notches ------------------------------------------------------------- */

/* Where a lead-out crosses a back patch of another net (the margin round
 * an icon or digit), the patch is cut back from the lead by the distance a
 * plate shift can bring them together (registration x sqrt 2), except
 * under the patch's own front shapes, which stay covered.  A patch may not
 * fall apart. */
/* The part of a lead over its own pixel's patch but off the pixel: it
 * lights with the pixel, so it joins the pixel's nominal region. */
static bool add_spur(struct gp_geos *geos, struct gp_pixel *px,
		     const struct gp_polyset *lead, const struct gp_polygon *patch,
		     const struct gp_polyset *region)
{
	struct gp_polyset back, over, spur, all, merged;
	gp_polyset_init(&back);
	gp_polyset_init(&over);
	gp_polyset_init(&spur);
	gp_polyset_init(&all);
	gp_polyset_init(&merged);
	struct gp_polygon p;
	bool ok = gp_polygon_copy(&p, patch) && gp_polyset_take(&back, &p) &&
		  gp_geos_intersection(geos, lead, &back, &over) &&
		  gp_geos_difference(geos, &over, region, &spur);
	double area = 0;
	for (size_t k = 0; k < spur.count; k++)
		area += gp_polygon_area_mm2(&spur.items[k]);
	if (!ok || area < 1e-9)
		goto out;
	/* the region's parts united again, so that they neither overlap
	 * nor touch */
	ok = px->shape.outer.count ? gp_polygon_copy(&p, &px->shape)
				   : gp_polygon_set_box(&p, px->box);
	ok = ok && gp_polyset_take(&all, &p);
	for (size_t k = 0; ok && k < px->more.count; k++)
		ok = gp_polygon_copy(&p, &px->more.items[k]) &&
		     gp_polyset_take(&all, &p);
	for (size_t k = 0; ok && k < spur.count; k++)
		ok = gp_polygon_copy(&p, &spur.items[k]) &&
		     gp_polyset_take(&all, &p);
	ok = ok && gp_geos_union_set(geos, &all, &merged) && merged.count;
	if (ok) {
		gp_polygon_finish(&px->shape);
		px->shape = merged.items[0];
		gp_polygon_init(&merged.items[0]);
		gp_polyset_finish(&px->more);
		gp_polyset_init(&px->more);
		struct gp_box box = gp_polygon_bounds(&px->shape);
		for (size_t k = 1; ok && k < merged.count; k++) {
			box = gp_box_union(box, gp_polygon_bounds(&merged.items[k]));
			ok = gp_polyset_take(&px->more, &merged.items[k]);
		}
		px->box = box;
	}
out:
	gp_polyset_finish(&back);
	gp_polyset_finish(&over);
	gp_polyset_finish(&spur);
	gp_polyset_finish(&all);
	gp_polyset_finish(&merged);
	return ok;
}

bool gp_route_notch(struct route *r, struct gp_geos *geos, size_t shape,
		    const struct gp_polygon *lead, int lead_net)
{
	struct gp_artwork *art = &r->build->art;
	int net = art->shapes[shape].net;
	int64_t clear = (int64_t)ceil((double)r->design->rules.registration *
				      SQRT2) +
			r->design->rules.chord_tolerance;
	struct gp_polyset lead_set, cut, keep, notch, patch, left;
	gp_polyset_init(&lead_set);
	gp_polyset_init(&cut);
	gp_polyset_init(&keep);
	gp_polyset_init(&notch);
	gp_polyset_init(&patch);
	gp_polyset_init(&left);
	struct gp_polygon p;
	gp_polygon_init(&p);
	bool ok = gp_polygon_copy(&p, lead) && gp_polyset_take(&lead_set, &p) &&
		  gp_geos_dilate_box(geos, &lead_set, clear, clear, &cut);
	/* the patch's pixels stay; so does their margin where the lead is
	 * one of theirs leaving them (the first margin of it then lights
	 * with the pixel, a spur no wider than the lead) */
	struct gp_polyset root, ring;
	gp_polyset_init(&root);
	gp_polyset_init(&ring);
	struct gp_pixel *mine = NULL;
	for (size_t i = 0; ok && i < art->pixel_count; i++) {
		struct gp_pixel *px = &art->pixels[i];
		if (px->common != net && px->segment != net)
			continue;
		bool own = px->common == lead_net || px->segment == lead_net;
		if (own && !mine)
			mine = px;
		ok = px->shape.outer.count ? gp_polygon_copy(&p, &px->shape)
					   : gp_polygon_set_box(&p, px->box);
		ok = ok && gp_polyset_take(own ? &root : &keep, &p);
		for (size_t k = 0; ok && k < px->more.count; k++)
			ok = gp_polygon_copy(&p, &px->more.items[k]) &&
			     gp_polyset_take(own ? &root : &keep, &p);
	}
	int64_t m = r->design->rules.registration;
	ok = ok && (root.count == 0 ||
		    gp_geos_dilate_box(geos, &root, m, m, &ring));
	for (size_t k = 0; ok && k < ring.count; k++)
		ok = gp_polygon_copy(&p, &ring.items[k]) &&
		     gp_polyset_take(&keep, &p);
	/* near the patch's own leads and buses the patch stays, so that
	 * they stay attached; never under the lead itself */
	struct gp_polyset own, own_near, soft, both;
	gp_polyset_init(&own);
	gp_polyset_init(&own_near);
	gp_polyset_init(&soft);
	gp_polyset_init(&both);
	struct gp_box cb = gp_polygon_bounds(lead);
	cb = gp_box_make(cb.x0 - 2 * clear, cb.y0 - 2 * clear, cb.x1 + 2 * clear,
			 cb.y1 + 2 * clear);
	enum gp_layer layer = art->shapes[shape].layer;
	for (size_t i = 0; ok && i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		struct gp_box sb = gp_polygon_bounds(&s->poly);
		if (s->net != net || s->layer != layer ||
		    s->role == GP_ROLE_PATCH || sb.x1 < cb.x0 || sb.x0 > cb.x1 ||
		    sb.y1 < cb.y0 || sb.y0 > cb.y1)
			continue;
		ok = gp_polygon_copy(&p, &s->poly) && gp_polyset_take(&own, &p);
	}
	/* and its lead, not drawn yet */
	const struct netstate *ns = net >= 0 && (size_t)net < r->net_count
					    ? &r->nets[net] : NULL;
	if (ok && ns && ns->ledge >= 0 && ns->decided) {
		ok = gp_polygon_set_box(&p, ns->corridor) &&
		     gp_polyset_take(&own, &p);
		if (ok && ns->path_count >= 2)
			ok = gp_polygon_copy(&p, &ns->path_poly) &&
			     gp_polyset_take(&own, &p);
	}
	ok = ok && gp_geos_difference(geos, &cut, &keep, &soft) &&
	     gp_geos_dilate_box(geos, &own, clear, clear, &own_near) &&
	     gp_geos_difference(geos, &soft, &own_near, &both);
	gp_polyset_finish(&own);
	gp_polyset_init(&own);
	ok = ok &&
	     gp_polygon_copy(&p, lead) && gp_polyset_take(&both, &p) &&
	     gp_geos_union_set(geos, &both, &own) &&
	     gp_geos_difference(geos, &own, &keep, &notch) &&
	     gp_polygon_copy(&p, &art->shapes[shape].poly) &&
	     gp_polyset_take(&patch, &p) &&
	     gp_geos_difference(geos, &patch, &notch, &left);
	gp_polyset_finish(&own);
	gp_polyset_finish(&own_near);
	gp_polyset_finish(&soft);
	gp_polyset_finish(&both);
	if (ok && left.count == 1) {
		gp_polygon_finish(&art->shapes[shape].poly);
		art->shapes[shape].poly = left.items[0];
		gp_polygon_init(&left.items[0]);
		if (mine)
			ok = add_spur(geos, mine, &lead_set,
				      &art->shapes[shape].poly, &root);
	} else if (ok) {
		char x[32], y[32];
		struct gp_box b = gp_polygon_bounds(lead);
		ok = gp_diag_error(r->diag, NULL,
				   "%s: the lead-out of %s would cut the back "
				   "patch of %s in %s near (%s, %s) mm; move "
				   "the element or its neighbour",
				   r->design->spec->file, net_name(r, lead_net),
				   net_name(r, net),
				   left.count ? "pieces" : "nothing",
				   mm(x, b.x0), mm(y, b.y0));
	}
	gp_polygon_finish(&p);
	gp_polyset_finish(&root);
	gp_polyset_finish(&ring);
	gp_polyset_finish(&lead_set);
	gp_polyset_finish(&cut);
	gp_polyset_finish(&keep);
	gp_polyset_finish(&notch);
	gp_polyset_finish(&patch);
	gp_polyset_finish(&left);
	return ok;
}

static bool notch_one(struct route *r, struct gp_geos *geos, size_t shape,
		      struct gp_box corridor, int lead_net)
{
	struct gp_polygon p;
	gp_polygon_init(&p);
	bool ok = gp_polygon_set_box(&p, corridor) &&
		  gp_route_notch(r, geos, shape, &p, lead_net);
	gp_polygon_finish(&p);
	return ok;
}

static bool notch_patches(struct route *r, struct gp_geos *geos)
{
	struct gp_artwork *art = &r->build->art;
	bool ok = true;
	for (size_t i = 0; ok && i < r->net_count; i++) {
		struct netstate *n = &r->nets[i];
		if (n->ledge < 0 || n->chosen < 0)
			continue;
		enum gp_layer other = gp_plate_ito_layer(
			art->nets[i].plate == GP_PLATE_FRONT ? GP_PLATE_BACK
							     : GP_PLATE_FRONT);
		for (size_t k = 0; ok && k < art->shape_count; k++) {
			const struct gp_shape *s = &art->shapes[k];
			if (s->role != GP_ROLE_PATCH || s->layer != other ||
			    s->net == (int)i)
				continue;
			struct gp_box b = gp_polygon_bounds(&s->poly);
			int64_t c = r->design->rules.registration * 2;
			struct gp_box q = n->corridor;
			q = gp_box_grow(q, c);
			if (gp_box_overlap(b, q))
				ok = notch_one(r, geos, k, n->corridor, (int)i);
			if (!ok || n->path_count < 2)
				continue;
			q = gp_polygon_bounds(&n->path_poly);
			q = gp_box_grow(q, c);
			if (gp_box_overlap(b, q))
				ok = gp_route_notch(r, geos, k, &n->path_poly,
						    (int)i);
		}
	}
	return ok;
}

/* A bundle lead that goes round things keeps its distances: the sweep's
 * boxes promise it, GEOS confirms it. */
static bool check_paths(struct route *r, struct gp_geos *geos)
{
	const struct gp_artwork *art = &r->build->art;
	bool ok = true;
	for (size_t i = 0; ok && i < r->net_count; i++) {
		struct netstate *n = &r->nets[i];
		if (n->ledge < 0 || n->path_count < 2 ||
		    (n->path_count == 2 && !n->bend[n->chosen]))
			continue;
		enum gp_layer mine = gp_plate_ito_layer(art->nets[i].plate);
		struct gp_box bb = gp_polygon_bounds(&n->path_poly);
		int64_t g = r->min_space;
		bb = gp_box_grow(bb, g);
		/* what the lead adds outside its own net's ITO */
		struct gp_polyset own;
		gp_polyset_init(&own);
		for (size_t k = 0; ok && k < art->shape_count; k++) {
			struct gp_polygon copy;
			if (art->shapes[k].net == (int)i &&
			    art->shapes[k].layer == mine &&
			    art->shapes[k].role != GP_ROLE_LEAD)
				ok = gp_polygon_copy(&copy, &art->shapes[k].poly) &&
				     gp_polyset_take(&own, &copy);
		}
		struct gp_geos_shape *whole =
			gp_geos_shape_from_polygon(geos, &n->path_poly);
		struct gp_polyset merged;
		gp_polyset_init(&merged);
		ok = ok && gp_geos_union_set(geos, &own, &merged);
		struct gp_geos_shape *mask =
			ok ? gp_geos_shape_from_polyset(geos, &merged) : NULL;
		gp_polyset_finish(&merged);
		struct gp_geos_shape *lead =
			whole && mask ? gp_geos_shape_difference(geos, whole, mask)
				      : NULL;
		gp_geos_shape_destroy(geos, whole);
		gp_geos_shape_destroy(geos, mask);
		gp_polyset_finish(&own);
		ok = lead != NULL;
		for (size_t k = 0; ok && k < art->shape_count; k++) {
			const struct gp_shape *s = &art->shapes[k];
			if ((s->layer != GP_LAYER_FRONT_ITO &&
			     s->layer != GP_LAYER_BACK_ITO) || s->net == (int)i ||
			    s->net < 0 || !gp_box_overlap(gp_polygon_bounds(&s->poly), bb) ||
			    (s->layer != mine && s->role == GP_ROLE_PATCH))
				continue;
			struct gp_geos_shape *o = gp_geos_shape_from_polygon(geos, &s->poly);
			double d = 0;
			bool bad = false;
			ok = o != NULL;
			if (ok && s->layer == mine) {
				ok = gp_geos_shape_distance(geos, lead, o, &d);
				bad = d < (double)g - 1;
			} else if (ok) {
				bad = gp_geos_shape_overlaps_area(geos, lead, o);
			}
			gp_geos_shape_destroy(geos, o);
			if (ok && bad) {
				char x[32], y[32];
				struct gp_box sb = gp_polygon_bounds(&s->poly);
				ok = gp_diag_error(
					r->diag, NULL,
					"%s: the lead of %s, going round what is "
					"in its way, comes too close to %s near "
					"(%s, %s) mm; move the elements apart",
					r->design->spec->file, net_name(r, (int)i),
					s->net >= 0 ? net_name(r, s->net) : "ITO",
					mm(x, (sb.x0 + sb.x1) / 2),
					mm(y, (sb.y0 + sb.y1) / 2));
			}
		}
		gp_geos_shape_destroy(geos, lead);
	}
	return ok;
}

/* --- transfers ---------------------------------------------------------- */

/* A flattened circle: vertices on the circle, chord error within tol. */
static bool circle_polygon(struct gp_point c, int64_t d, int64_t tol,
			   struct gp_polygon *poly)
{
	int quadrant = gp_geos_quadrant_segments(d / 2, tol > 0 ? tol : 1000);
	int n = 4 * quadrant;
	bool ok = true;
	for (int i = 0; ok && i < n; i++) {
		double a = 2 * PI * i / n;
		ok = gp_ring_push(&poly->outer,
				  c.x + llround((double)d / 2 * cos(a)),
				  c.y + llround((double)d / 2 * sin(a)));
	}
	return ok;
}

/* Dots and their ITO pads for a net that changes plates. */
static bool add_transfers(struct route *r, int net, const struct netstate *n)
{
	const struct gp_transfer_spec *t = &r->g->transfers;
	const struct cand *c = &n->cands[n->chosen];
	int64_t zone = transfer_zone(r);
	/* distance from the seal's outer edge outwards (negative: inwards)
	 * to the outer end of the zone */
	int64_t outer = t->outside ? zone : 0;
	int64_t lat = t->size + 2 * t->margin;
	for (int i = 0; i < (int)t->count; i++) {
		int64_t along = outer - t->margin - t->size / 2 -
				i * (t->size + t->margin);
		struct gp_point p;
		switch (c->side) {
		case GP_SIDE_BOTTOM: p = (struct gp_point){ c->at.x, r->s_out.y0 - along }; break;
		case GP_SIDE_TOP: p = (struct gp_point){ c->at.x, r->s_out.y1 + along }; break;
		case GP_SIDE_LEFT: p = (struct gp_point){ r->s_out.x0 - along, c->at.y }; break;
		default: p = (struct gp_point){ r->s_out.x1 + along, c->at.y }; break;
		}
		struct gp_polygon dot;
		gp_polygon_init(&dot);
		struct gp_shape *shape = NULL;
		if (circle_polygon(p, t->size, r->design->rules.chord_tolerance,
				   &dot))
			shape = gp_artwork_add_shape(&r->build->art,
						     GP_LAYER_TRANSFER,
						     GP_ROLE_TRANSFER, net, &dot);
		gp_polygon_finish(&dot);
		if (!shape)
			return false;
		/* flashed with a round aperture (Gerber spec 6.4) */
		shape->flash_diameter = t->size;
		shape->flash_centre = p;
	}
	/* ITO under the dots on both plates */
	struct cand pad = *c;
	pad.width = lat;
	struct gp_box box = corridor_box(r, &pad, n->ext);
	int64_t inner = outer - zone;
	switch (c->side) {
	case GP_SIDE_BOTTOM: box.y1 = r->s_out.y0 - inner; break;
	case GP_SIDE_TOP: box.y0 = r->s_out.y1 + inner; break;
	case GP_SIDE_LEFT: box.x1 = r->s_out.x0 - inner; break;
	default: box.x0 = r->s_out.x1 + inner; break;
	}
	return gp_artwork_add_box(&r->build->art, GP_LAYER_FRONT_ITO,
				  GP_ROLE_TRANSFER, net, box) &&
	       gp_artwork_add_box(&r->build->art, GP_LAYER_BACK_ITO,
				  GP_ROLE_TRANSFER, net, box);
}

static bool check_transfer_room(struct route *r)
{
	const struct gp_transfer_spec *t = &r->g->transfers;
	if (t->outside)
		return true;
	int64_t band = r->g->seal.width;
	int64_t need = transfer_zone(r);
	if (need <= band)
		return true;
	char a[32], b[32], c[32], d[32];
	const struct gp_where *where = t->where.file ? &t->where
			 : r->g->seal.where.file ? &r->g->seal.where
						 : &r->ledges[0].where;
	return gp_diag_error(r->diag, where,
			     "%ld transfer dots of %s mm with %s mm margins "
			     "need %s mm across the seal band, which is %s mm "
			     "wide; use smaller or fewer dots, a wider seal "
			     "or 'place: outside'",
			     t->count, mm(a, t->size), mm(b, t->margin),
			     mm(c, need), mm(d, band));
}
/* --- the stage --------------------------------------------------------------- */

static bool check_seal_fits(struct route *r)
{
	const struct gp_design *d = r->design;
	struct gp_box f = d->front.box, b = d->back.box;
	struct gp_box both = gp_box_make(max64(f.x0, b.x0), max64(f.y0, b.y0),
					 min64(f.x1, b.x1), min64(f.y1, b.y1));
	struct gp_box o = r->s_out;
	char a[32], c[32], e[32], g[32];
	if (o.x0 < both.x0 || o.y0 < both.y0 || o.x1 > both.x1 || o.y1 > both.y1)
		return gp_diag_error(r->diag, &r->g->seal.where,
				     "the seal's outer edge (x %s..%s, y "
				     "%s..%s mm) must lie where the two plates "
				     "overlap; reduce its 'distance' or "
				     "'width'",
				     mm(a, o.x0), mm(c, o.x1), mm(e, o.y0),
				     mm(g, o.y1));
	const struct gp_artwork *art = &r->build->art;
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->net < 0 || (s->layer != GP_LAYER_FRONT_ITO &&
				   s->layer != GP_LAYER_BACK_ITO))
			continue;
		struct gp_box bb = gp_polygon_bounds(&s->poly);
		if (bb.x0 < r->s_in.x0 || bb.y0 < r->s_in.y0 ||
		    bb.x1 > r->s_in.x1 || bb.y1 > r->s_in.y1)
			return gp_diag_error(
				r->diag, &r->g->seal.where,
				"the %s of %s (x %s..%s, y %s..%s mm) "
				"reaches into the seal; the seal must keep "
				"'distance' from the viewing area and every "
				"electrode inside it",
				gp_role_name(s->role), net_name(r, s->net),
				mm(a, bb.x0), mm(c, bb.x1), mm(e, bb.y0),
				mm(g, bb.y1));
	}
	return true;
}

static void forward(struct gp_diag *to, const struct gp_diag *from)
{
	for (size_t i = 0; i < from->count; i++)
		gp_diag_copy(to, &from->entries[i]);
}

static bool has_turning(const struct route *r)
{
	for (size_t i = 0; i < r->net_count; i++)
		for (int k = 0; k < r->nets[i].cand_count; k++)
			if (r->nets[i].cands[k].turn)
				return true;
	return false;
}

/* Ends for every net, then the leads toward each ledge round what is in
 * their way.  A lead that cannot go round (hemmed in by other leads) is
 * told to take its next way out, and everything is chosen again. */
static bool choose_and_bundle(struct route *r, struct gp_geos_index *index,
			      struct gp_geos *geos)
{
	struct gp_diag *diag = r->diag;
	struct cand **saved = calloc(r->net_count + 1, sizeof(*saved));
	bool copied = saved != NULL;
	for (size_t i = 0; copied && i < r->net_count; i++) {
		size_t n = (size_t)r->nets[i].cand_count;
		saved[i] = malloc((n ? n : 1) * sizeof(**saved));
		copied = saved[i] != NULL;
		if (copied && n)
			memcpy(saved[i], r->nets[i].cands, n * sizeof(**saved));
	}
	if (!copied) {
		for (size_t i = 0; saved && i < r->net_count; i++)
			free(saved[i]);
		free(saved);
		return gp_diag_oom(diag, NULL);
	}
	bool ok = false;
	for (size_t attempt = 0;; attempt++) {
		struct gp_diag scratch;
		gp_diag_init(&scratch);
		r->diag = &scratch;
		int culprit = -1;
		for (size_t i = 0; i < r->net_count; i++) {
			struct netstate *n = &r->nets[i];
			if (n->cand_count)
				memcpy(n->cands, saved[i],
				       (size_t)n->cand_count * sizeof(*n->cands));
			free(n->path);
			n->path = NULL;
			n->path_count = 0;
			gp_polygon_finish(&n->path_poly);
			gp_polygon_init(&n->path_poly);
		}
		ok = choose_ends(r, index, geos);
		for (size_t i = 0; ok && i < r->net_count; i++)
			r->nets[i].decided = r->nets[i].ledge >= 0 &&
					     !r->nets[i].bundle;
		for (size_t i = 0; ok && i < r->g->ledge_count; i++)
			ok = gp_route_bundle(r, (int)i, &culprit);
		r->diag = diag;
		struct netstate *c = culprit >= 0 ? &r->nets[culprit] : NULL;
		bool retry = !ok && c && !scratch.lost &&
			     (c->bend[c->chosen] || c->usable > 1) &&
			     attempt < r->net_count;
		if (!ok && !retry && !scratch.lost && !r->turning &&
		    has_turning(r)) {
			/* once more, with the ends that turn */
			gp_diag_finish(&scratch);
			r->turning = true;
			attempt = 0;
			for (size_t i = 0; i < r->net_count; i++) {
				struct netstate *m = &r->nets[i];
				m->no_bend = false;
				for (int k = 0; k < m->cand_count; k++)
					m->banned[k] = false;
			}
			continue;
		}
		if (!retry)
			forward(diag, &scratch);
		gp_diag_finish(&scratch);
		if (!retry)
			break;
		/* a lead that went round leaves straight; one that went
		 * straight takes its next end */
		if (c->bend[c->chosen])
			c->no_bend = true;
		else
			c->banned[c->chosen] = true;
	}
	for (size_t i = 0; i < r->net_count; i++)
		free(saved[i]);
	free(saved);
	return ok;
}

bool gp_route_layout(struct gp_build *build, struct gp_diag *diag)
{
	const struct gp_design *d = build->design;
	const struct gp_routing *g = d->routing;
	if (!g)
		return true;
	struct route r = {
		.build = build,
		.design = d,
		.g = g,
		.diag = diag,
		.net_count = build->art.net_count,
		.space = g->leads.space,
		.min_space = d->rules.min_space,
	};
	/* the ledges as resolved for this build (plate, pin 1, map); the
	 * design stays as read */
	memcpy(build->ledges, g->ledges, sizeof(build->ledges));
	build->ledge_count = g->ledge_count;
	r.ledges = build->ledges;
	gp_seal_boxes(d, &r.s_in, &r.s_out);
	struct gp_geos *geos = gp_geos_create(diag);
	struct gp_geos_index *index = NULL;
	r.nets = calloc(r.net_count ? r.net_count : 1, sizeof(*r.nets));
	bool ok = geos && r.nets;
	if (!ok) {
		gp_diag_oom(diag, NULL);
		goto out;
	}
	if (!(ok = check_seal_fits(&r)))
		goto out;
	for (size_t i = 0; ok && i < g->ledge_count; i++)
		ok = resolve_ledge_plate(&r, &r.ledges[i]) &&
		     check_connection(&r, &r.ledges[i]);
	for (size_t i = 0; ok && i < g->ledge_count; i++)
		compare_connection(&r, &r.ledges[i]);
	if (!ok)
		goto out;
	if (g->ledge_count == 0)
		goto seal;
	ok = check_transfer_room(&r) && gp_route_assign_nets(&r);
	if (ok)
		net_centres(&r);
	ok = ok && gp_route_join(&r, geos) && collect_cands(&r);
	if (!ok)
		goto out;
	index = gp_geos_index_create(geos);
	ok = index != NULL;
	const struct gp_artwork *art = &build->art;
	for (size_t i = 0; ok && i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->net >= 0 && (s->layer == GP_LAYER_FRONT_ITO ||
				    s->layer == GP_LAYER_BACK_ITO))
			ok = gp_geos_index_add(index, gp_polygon_bounds(&s->poly), i);
	}
	ok = ok && choose_and_bundle(&r, index, geos);
	ok = ok && notch_patches(&r, geos);
	if (!ok)
		goto out;
	for (size_t i = 0; ok && i < r.net_count; i++) {
		struct netstate *n = &r.nets[i];
		if (n->ledge < 0)
			continue;
		enum gp_plate plate = build->art.nets[i].plate;
		struct gp_polygon copy;
		gp_polygon_init(&copy);
		ok = gp_artwork_add_box(&build->art, gp_plate_ito_layer(plate),
					GP_ROLE_LEAD, (int)i, n->corridor) &&
		     (!n->transfer || add_transfers(&r, (int)i, n));
		if (ok && n->cands[n->chosen].turn)
			ok = gp_artwork_add_box(&build->art,
						gp_plate_ito_layer(plate),
						GP_ROLE_LEAD, (int)i,
						n->cands[n->chosen].turn_stub);
		if (ok && n->path_count >= 2) {
			ok = gp_polygon_copy(&copy, &n->path_poly) &&
			     gp_artwork_add_shape(&build->art,
						  gp_plate_ito_layer(plate),
						  GP_ROLE_LEAD, (int)i, &copy);
			gp_polygon_finish(&copy);
		}
		if (!ok)
			gp_diag_oom(diag, NULL);
	}
	ok = ok && check_paths(&r, geos);
	for (size_t i = 0; ok && i < g->ledge_count; i++)
		ok = gp_route_ledge(&r, (int)i);
	for (size_t i = 0; ok && i < build->pin_count; i++) {
		struct gp_pin *p = &build->pins[i];
		const struct gp_ledge *l = &r.ledges[p->ledge];
		if (p->net >= 0)
			build->art.nets[p->net].pin = p->number;
		ok = gp_artwork_add_box(&build->art, gp_plate_ito_layer(l->plate),
					GP_ROLE_PAD, p->net, p->box) != NULL;
	}
	if (!ok)
		goto out;
	for (size_t i = 0; i < g->ledge_count; i++) {
		const struct gp_ledge *l = &r.ledges[i];
		size_t n = 0, used = 0;
		for (size_t k = 0; k < build->pin_count; k++) {
			n += build->pins[k].ledge == (int)i;
			used += build->pins[k].ledge == (int)i &&
				build->pins[k].net >= 0;
		}
		char pitch[32];
		gp_buffer_printf(&build->notes,
				 "ledge %s: %zu pads (%zu used) at %s mm on the "
				 "%s of the %s plate\n",
				 l->name, n, used, mm(pitch, l->pitch),
				 gp_side_name(l->side),
				 l->plate == GP_PLATE_FRONT ? "front" : "back");
	}
seal:
	ok = gp_seal_layout(build, &r.s_in, &r.s_out, geos, diag);
out:
	gp_geos_index_destroy(index);
	gp_geos_destroy(geos);
	for (size_t i = 0; r.nets && i < r.net_count; i++) {
		free(r.nets[i].path);
		gp_polygon_finish(&r.nets[i].path_poly);
		free_cands(&r.nets[i]);
	}
	free(r.nets);
	return ok;
}
