/* Leads that leave toward their ledge inside the seal, routed together so
 * that they go round what is in their way (an icon under a dot-matrix
 * block, another element) with straight and 45-degree segments.
 *
 * In the frame turned so that the ledge is at the bottom, every lead runs
 * downwards from its start (an electrode's end) to the seal.  A sweep from
 * the top down stops at every level where something begins or ends: the
 * top and the bottom of each obstacle (any ITO of either plate, and the
 * straight leads of nets that leave another way, grown by the clearance:
 * min_space or the diagonal of the registration box, whichever is more,
 * and half a lead),
 * and where a lead starts.  Between two levels nothing begins or ends, so
 * the leads keep their order and, level by level, take the positions
 * nearest their own that keep them out of the obstacles of the band below
 * the level and of the band above it (where they move), with lead width
 * plus space between neighbours: a lead over an obstacle goes round the
 * nearer side of it, its neighbours make room.  A lead stays put while it
 * is inside the electrode it starts from (or a patch round it).  The moves
 * are diagonals in the band above the level, staggered like the fan-out to
 * the pads so that parallel diagonals keep their spacing.  At the seal the
 * leads are spaced for their transfer pads.  What does not fit is an error
 * naming the leads, the place, the room needed and the room there is. */
#include "route-private.h"
#include "units.h"

#include "array.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define MAX_POINTS 64

struct bobst {
	struct gp_box b;          /* canonical, grown by the clearance */
	struct gp_box raw;        /* canonical, as it is */
	int net;
	bool patch;
};

struct blead {
	int net;
	struct gp_point start;    /* canonical */
	int64_t w, wf;            /* width; width at the seal (transfer pad) */
	enum gp_plate plate;
	int64_t x;                /* where it is now */
	int64_t p;                /* where it goes at this level */
	bool started, pinned;
	int gap;
	struct gp_point pts[MAX_POINTS];
	int n;
	int64_t ytop, ybot;
};

struct bundle {
	struct route *r;
	const struct gp_ledge *l;
	int index;
	struct bobst *obs;
	size_t obs_count;
	struct blead *leads;
	size_t count;
	int *order;               /* started leads by x */
	size_t active;
	int64_t clear;            /* obstacle clearance plus half the widest lead */
	int64_t space;
	int64_t shift;            /* from the other plate's leads */
	int64_t lo, hi;           /* where lead centres may be, across */
	int64_t y_seal;
	int culprit;              /* a lead to send another way, when one
				   * failed */
};

static void push_point(struct blead *l, int64_t x, int64_t y)
{
	if (l->n && l->pts[l->n - 1].x == x && l->pts[l->n - 1].y == y)
		return;
	if (l->n < MAX_POINTS)
		l->pts[l->n++] = (struct gp_point){ x, y };
}

/* --- what is in the way ------------------------------------------------- */

static bool add_obstacle(struct bundle *b, struct gp_box box, int net,
			 bool patch, size_t *cap)
{
	if (!gp_array_reserve(b->obs, (*cap), b->obs_count + 1))
		return false;
	struct gp_box q = box_map(box, b->l->side, true);
	int64_t g = b->clear;
	b->obs[b->obs_count++] = (struct bobst){
		gp_box_grow(q, g), q, net,
		patch };
	return true;
}

static bool in_bundle(const struct bundle *b, int net)
{
	for (size_t i = 0; i < b->count; i++)
		if (b->leads[i].net == net)
			return true;
	return false;
}

/* Height of the slices a thin slanted obstacle is cut into: its boxes
 * follow its outline that closely. */
#define SLICE (250 * 1000)

static bool rectilinear(const struct gp_polygon *p)
{
	const struct gp_ring *o = &p->outer;
	for (size_t i = 0; i < o->count; i++) {
		struct gp_point a = o->points[i], c = o->points[(i + 1) % o->count];
		if (a.x != c.x && a.y != c.y)
			return false;
	}
	return p->hole_count == 0 && o->count == 4;
}

/* A polygon as boxes: one per horizontal slice (in the glass frame; the
 * boxes are turned with the rest), each as wide as the outline there. */
static bool add_polygon(struct bundle *b, const struct gp_polygon *p, int net,
			bool patch, size_t *cap)
{
	struct gp_box bb = gp_polygon_bounds(p);
	/* compact shapes (icons, letters) stay whole, so that leads go
	 * round them in one move; thin slanted ones (leads, buses) are
	 * sliced */
	double box = gp_mm(gp_box_width(bb)) * gp_mm(gp_box_height(bb));
	if (rectilinear(p) || gp_box_height(bb) <= SLICE ||
	    gp_polygon_area_mm2(p) > 0.25 * box)
		return add_obstacle(b, bb, net, patch, cap);
	const struct gp_ring *o = &p->outer;
	for (int64_t ya = bb.y0; ya < bb.y1; ya += SLICE) {
		int64_t yb = min64(ya + SLICE, bb.y1);
		int64_t x0 = INT64_MAX, x1 = INT64_MIN;
		for (size_t i = 0; i < o->count; i++) {
			struct gp_point a = o->points[i];
			struct gp_point c = o->points[(i + 1) % o->count];
			if (a.y >= ya && a.y <= yb)
				x0 = min64(x0, a.x), x1 = max64(x1, a.x);
			int64_t ys[2] = { ya, yb };
			for (int k = 0; k < 2; k++) {
				if ((a.y < ys[k]) == (c.y < ys[k]) || a.y == c.y)
					continue;
				double t = (double)(ys[k] - a.y) / (double)(c.y - a.y);
				int64_t x = a.x + llround(t * (double)(c.x - a.x));
				x0 = min64(x0, x), x1 = max64(x1, x);
			}
		}
		if (x0 <= x1 &&
		    !add_obstacle(b, gp_box_make(x0, ya, x1, yb), net, patch, cap))
			return false;
	}
	return true;
}

static bool collect_obstacles(struct bundle *b)
{
	struct route *r = b->r;
	const struct gp_artwork *art = &r->build->art;
	size_t cap = 0;
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if ((s->layer != GP_LAYER_FRONT_ITO &&
		     s->layer != GP_LAYER_BACK_ITO) || s->open_path)
			continue;
		struct gp_box bb = gp_polygon_bounds(&s->poly);
		if (bb.x1 < r->s_in.x0 || bb.x0 > r->s_in.x1 ||
		    bb.y1 < r->s_in.y0 || bb.y0 > r->s_in.y1)
			continue;
		if (!add_polygon(b, &s->poly, s->net, s->role == GP_ROLE_PATCH,
				 &cap))
			return gp_diag_oom(b->r->diag, NULL);
	}
	/* leads of nets that leave another way, and bundles done before;
	 * the sideways stubs of ends that turn */
	for (size_t i = 0; i < r->net_count; i++) {
		const struct netstate *n = &r->nets[i];
		if (n->ledge >= 0 && n->cands[n->chosen].turn &&
		    !add_obstacle(b, n->cands[n->chosen].turn_stub, (int)i,
				  false, &cap))
			return gp_diag_oom(b->r->diag, NULL);
		if (n->ledge < 0 || in_bundle(b, (int)i) || !n->decided)
			continue;
		if (!add_obstacle(b, n->corridor, (int)i, false, &cap))
			return gp_diag_oom(b->r->diag, NULL);
		if (n->path_count >= 2 &&
		    !add_polygon(b, &n->path_poly, (int)i, false, &cap))
			return gp_diag_oom(b->r->diag, NULL);
	}
	return true;
}

/* An obstacle a lead starts in (its own electrode, a patch round it,
 * which is notched round the lead) or beside and above (the other
 * plate's strip its electrode ends beside) does not push it: it stays
 * put until past it. */
static bool exempt(const struct blead *l, const struct bobst *o)
{
	if (o->net == l->net)
		return true;
	if (!(l->start.x > o->b.x0 && l->start.x < o->b.x1 &&
	      l->start.y > o->b.y0 && l->start.y <= o->b.y1))
		return false;
	bool inside = l->start.x >= o->raw.x0 && l->start.x <= o->raw.x1 &&
		      l->start.y >= o->raw.y0 && l->start.y <= o->raw.y1;
	return (o->patch && inside) || o->raw.y0 >= l->start.y;
}

/* --- levels --------------------------------------------------------------- */

static int compare_desc(const void *a, const void *c)
{
	int64_t x = *(const int64_t *)a, y = *(const int64_t *)c;
	return (x < y) - (x > y);
}

/* Levels from the highest start down to the seal, each once. */
static int64_t *levels(struct bundle *b, size_t *count)
{
	int64_t top = INT64_MIN;
	for (size_t i = 0; i < b->count; i++)
		top = max64(top, b->leads[i].start.y);
	int64_t *v = malloc((2 * b->obs_count + b->count + 1) * sizeof(*v));
	if (!v)
		return NULL;
	size_t n = 0;
	for (size_t i = 0; i < b->obs_count; i++) {
		if (b->obs[i].b.y1 < top && b->obs[i].b.y1 > b->y_seal)
			v[n++] = b->obs[i].b.y1;
		if (b->obs[i].b.y0 < top && b->obs[i].b.y0 > b->y_seal)
			v[n++] = b->obs[i].b.y0;
	}
	for (size_t i = 0; i < b->count; i++)
		if (b->leads[i].start.y > b->y_seal)
			v[n++] = b->leads[i].start.y;
	v[n++] = b->y_seal;
	qsort(v, n, sizeof(*v), compare_desc);
	size_t m = 0;
	for (size_t i = 0; i < n; i++)
		if (m == 0 || v[m - 1] != v[i])
			v[m++] = v[i];
	*count = m;
	return v;
}

/* Active in the band (y0, y1): overlaps it. */
static bool active(const struct bobst *o, int64_t y0, int64_t y1)
{
	return o->b.y1 > y0 && o->b.y0 < y1;
}

/* --- positions at a level ----------------------------------------------- */

struct span {
	int64_t a, b;
};

static int compare_span(const void *p, const void *q)
{
	const struct span *x = p, *y = q;
	return (x->a > y->a) - (x->a < y->a);
}

static int64_t need(const struct bundle *b, const struct blead *x,
		    const struct blead *y, bool final)
{
	int64_t g = (x->w + y->w) / 2 +
		    (x->plate == y->plate ? b->space : max64(b->space, b->shift));
	if (final)
		g = max64(g, (x->wf + y->wf) / 2 + b->r->min_space);
	return g;
}

/* Of leads order[from..to), one that went round (else any). */
static void blame(struct bundle *b, size_t from, size_t to)
{
	for (size_t k = from; k < to && b->culprit < 0; k++) {
		int net = b->leads[b->order[k]].net;
		const struct netstate *n = &b->r->nets[net];
		if (n->bend[n->chosen])
			b->culprit = net;
	}
	/* else one with another way out */
	for (size_t k = from; k < to && b->culprit < 0; k++) {
		int net = b->leads[b->order[k]].net;
		if (b->r->nets[net].usable > 1)
			b->culprit = net;
	}
}

static bool report_room(struct bundle *b, size_t from, size_t to,
			struct span gap, int64_t y)
{
	struct route *r = b->r;
	char a[32], c[32], d[32], e[32], f[32];
	int64_t want = 0;
	for (size_t k = from; k < to; k++)
		want += b->leads[b->order[k]].w + b->space;
	struct gp_point at = from_canon(b->l->side,
					(struct gp_point){ (gap.a + gap.b) / 2, y });
	blame(b, from, to);
	return gp_diag_error(
		r->diag, &b->l->where,
		"ledge '%s': %zu leads (%s to %s) must pass between obstacles "
		"near (%s, %s) mm on their way to the seal; they need %zu x "
		"(%s + %s) mm but only %s mm is free there; move the elements "
		"apart or make the leads narrower",
		b->l->name, to - from, net_name(r, b->leads[b->order[from]].net),
		net_name(r, b->leads[b->order[to - 1]].net), mm(a, at.x),
		mm(c, at.y), to - from, mm(d, b->leads[b->order[from]].w),
		mm(e, b->space), mm(f, max64(0, gap.b - gap.a + b->space)));
}

/* Places leads order[from..to) in gap (centres in [gap.a, gap.b]). */
static bool pack(struct bundle *b, size_t from, size_t to, struct span gap,
		 bool final, int64_t y)
{
	if (from == to)
		return true;
	struct blead *prev = NULL;
	for (size_t k = from; k < to; k++) {
		struct blead *l = &b->leads[b->order[k]];
		int64_t d = l->x < gap.a ? gap.a : l->x > gap.b ? gap.b : l->x;
		if (prev)
			d = max64(d, prev->p + need(b, prev, l, final));
		l->p = d;
		prev = l;
	}
	struct blead *next = NULL;
	for (size_t k = to; k-- > from;) {
		struct blead *l = &b->leads[b->order[k]];
		if (l->p > gap.b)
			l->p = gap.b;
		if (next)
			l->p = min64(l->p, next->p - need(b, l, next, final));
		next = l;
	}
	if (b->leads[b->order[from]].p >= gap.a)
		return true;
	return report_room(b, from, to, gap, y);
}

/* Positions for the band below y (and, for the move, the band above). */
static bool place(struct bundle *b, int64_t y, int64_t below, int64_t above,
		  bool final)
{
	/* forbidden spans of centres, merged */
	struct span *f = malloc((b->obs_count + 1) * sizeof(*f));
	struct span *g = malloc((b->obs_count + 2) * sizeof(*g));
	if (!f || !g) {
		free(f);
		free(g);
		return gp_diag_oom(b->r->diag, NULL);
	}
	size_t nf = 0;
	for (size_t i = 0; i < b->obs_count; i++) {
		const struct bobst *o = &b->obs[i];
		if (!active(o, below, y) && !active(o, y, above))
			continue;
		/* pinned leads inside it keep their place; others keep out */
		f[nf++] = (struct span){ o->b.x0, o->b.x1 };
	}
	qsort(f, nf, sizeof(*f), compare_span);
	size_t ng = 0;
	int64_t at = b->lo;
	for (size_t i = 0; i < nf; i++) {
		if (f[i].a > at)
			g[ng++] = (struct span){ at, f[i].a };
		at = max64(at, f[i].b);
	}
	if (b->hi > at)
		g[ng++] = (struct span){ at, b->hi };
	if (ng == 0) {
		free(f);
		free(g);
		blame(b, 0, b->active);
		struct gp_point p = from_canon(b->l->side,
					       (struct gp_point){ b->lo, y });
		char x[32], z[32];
		return gp_diag_error(b->r->diag, &b->l->where,
				     "ledge '%s': no way through to the seal "
				     "near (%s, %s) mm for the leads toward "
				     "it; make room between the elements",
				     b->l->name, mm(x, p.x), mm(z, p.y));
	}
	/* pinned: inside an obstacle they are exempt from, active here */
	for (size_t k = 0; k < b->active; k++) {
		struct blead *l = &b->leads[b->order[k]];
		l->pinned = false;
		for (size_t i = 0; i < b->obs_count && !l->pinned; i++)
			l->pinned = (active(&b->obs[i], below, y) ||
				     active(&b->obs[i], y, above)) &&
				    exempt(l, &b->obs[i]);
		l->p = l->x;
		/* the gap: the one it is in, else beside the nearer end of
		 * the forbidden span it is in */
		l->gap = -1;
		for (size_t i = 0; i < ng && l->gap < 0; i++) {
			if (l->x >= g[i].a && l->x <= g[i].b)
				l->gap = (int)i;
			else if (l->x < g[i].a) {
				/* in the span before gap i */
				int64_t left = i ? g[i - 1].b : b->lo;
				l->gap = (i > 0 && l->x - left < g[i].a - l->x)
						 ? (int)i - 1
						 : (int)i;
			}
		}
		if (l->gap < 0)
			l->gap = (int)ng - 1;
	}
	/* gaps never go backwards along the order; pinned leads split it */
	int last = 0;
	bool ok = true;
	for (size_t k = 0; k < b->active; k++) {
		struct blead *l = &b->leads[b->order[k]];
		if (l->pinned)
			continue;
		if (l->gap < last)
			l->gap = last;
		last = l->gap;
	}
	for (size_t k = 0; ok && k < b->active;) {
		struct blead *l = &b->leads[b->order[k]];
		if (l->pinned || l->gap < 0) {
			k++;
			continue;
		}
		size_t e = k;
		while (e < b->active && !b->leads[b->order[e]].pinned &&
		       b->leads[b->order[e]].gap == l->gap)
			e++;
		struct span s = g[l->gap];
		/* centres keep half their own width more from the ends than
		 * the widest lead does */
		ok = pack(b, k, e, s, final, y);
		k = e;
	}
	free(f);
	free(g);
	return ok;
}

/* --- moves ------------------------------------------------------------------ */

static int dir_of(const struct blead *l)
{
	return (l->p > l->x) - (l->p < l->x);
}

/* Diagonals in the band (y, top]: parallel ones staggered so that they
 * keep the spacing (centre lines x +- y = const at least sqrt(2) (w + s)
 * apart), each starting below its lead's start. */
/* How high above level v[i] a lead may start its move: up to where it
 * last turned (or started), but not into a band with an obstacle
 * (not its own) across its way. */
static int64_t move_top(const struct bundle *b, const struct blead *l,
			const int64_t *v, size_t i)
{
	int64_t cap = l->start.y;
	if (l->n)
		cap = min64(cap, l->pts[l->n - 1].y);
	int64_t x0 = min64(l->x, l->p), x1 = max64(l->x, l->p);
	int64_t top = v[i];
	for (size_t j = i; j-- > 0;) {
		int64_t lo = v[j + 1], hi = min64(v[j], cap);
		if (lo >= cap)
			break;
		for (size_t k = 0; k < b->obs_count; k++) {
			const struct bobst *o = &b->obs[k];
			if (active(o, lo, hi) && o->b.x1 > x0 && o->b.x0 < x1 &&
			    !exempt(l, o))
				return top;
		}
		top = hi;
	}
	return max64(top, v[i]);
}

static bool move(struct bundle *b, const int64_t *v, size_t i)
{
	int64_t y = v[i];
	for (size_t k = 0; k < b->active; k++) {
		struct blead *l = &b->leads[b->order[k]];
		l->ytop = l->p == l->x ? v[i] : move_top(b, l, v, i);
	}
	for (size_t k = b->active; k-- > 1;) {
		struct blead *a = &b->leads[b->order[k - 1]];
		struct blead *c = &b->leads[b->order[k]];
		int64_t d = (int64_t)ceil(SQRT2 * (double)need(b, a, c, false)) + 2;
		if (dir_of(a) > 0 && dir_of(c) > 0)
			a->ytop = min64(a->ytop, c->ytop + (c->x - a->x) - d);
	}
	for (size_t k = 1; k < b->active; k++) {
		struct blead *a = &b->leads[b->order[k - 1]];
		struct blead *c = &b->leads[b->order[k]];
		int64_t d = (int64_t)ceil(SQRT2 * (double)need(b, a, c, false)) + 2;
		if (dir_of(a) < 0 && dir_of(c) < 0)
			c->ytop = min64(c->ytop, a->ytop + (c->x - a->x) - d);
	}
	for (size_t k = 0; k < b->active; k++) {
		struct blead *l = &b->leads[b->order[k]];
		if (l->p == l->x)
			continue;
		int64_t shift = l->p > l->x ? l->p - l->x : l->x - l->p;
		l->ybot = l->ytop - shift;
		if (l->ybot < y) {
			char a[32], c[32], d[32], e[32];
			b->culprit = l->net;
			struct gp_point at = from_canon(
				b->l->side, (struct gp_point){ l->x, l->ytop });
			return gp_diag_error(
				b->r->diag, &b->l->where,
				"ledge '%s': the lead of %s must move %s mm "
				"sideways near (%s, %s) mm to pass what is below "
				"it, with too little room above that (%s mm "
				"short); move the elements apart",
				b->l->name, net_name(b->r, l->net), mm(a, shift),
				mm(c, at.x), mm(d, at.y), mm(e, y - l->ybot));
		}
		push_point(l, l->x, l->ytop);
		push_point(l, l->p, l->ybot);
		l->x = l->p;
	}
	return true;
}

/* --- the sweep --------------------------------------------------------- */

/* Starts the leads that begin at y, keeping order by x. */
static void start_at(struct bundle *b, int64_t y)
{
	for (size_t i = 0; i < b->count; i++) {
		struct blead *l = &b->leads[i];
		if (l->started || l->start.y < y)
			continue;
		l->started = true;
		l->x = l->start.x;
		push_point(l, l->x, l->start.y);
		size_t k = b->active++;
		while (k > 0 && b->leads[b->order[k - 1]].x > l->x) {
			b->order[k] = b->order[k - 1];
			k--;
		}
		b->order[k] = (int)i;
	}
}

static bool sweep(struct bundle *b)
{
	size_t n = 0;
	int64_t *v = levels(b, &n);
	if (!v)
		return gp_diag_oom(b->r->diag, NULL);
	bool ok = true;
	for (size_t i = 0; ok && i < n; i++) {
		int64_t y = v[i];
		bool final = i + 1 == n;
		int64_t below = final ? y - 1 : v[i + 1];
		/* positions for the band below y, moved into in the band
		 * above it (which the leads started so far have crossed) */
		ok = place(b, y, below, i ? v[i - 1] : y, final) &&
		     move(b, v, i);
		start_at(b, y);
	}
	for (size_t k = 0; k < b->count; k++)
		push_point(&b->leads[k], b->leads[k].x, b->y_seal);
	free(v);
	return ok;
}

/* --- the stage ------------------------------------------------------------ */

bool gp_route_bundle(struct route *r, int index, int *culprit)
{
	const struct gp_ledge *l = &r->ledges[index];
	struct bundle b = { .r = r, .l = l, .index = index, .culprit = -1 };
	const struct gp_rules *rules = &r->design->rules;
	size_t n = 0;
	for (size_t i = 0; i < r->net_count; i++)
		n += r->nets[i].ledge == index && r->nets[i].bundle;
	if (n == 0)
		return true;
	b.leads = calloc(n, sizeof(*b.leads));
	b.order = calloc(n, sizeof(*b.order));
	if (!b.leads || !b.order) {
		free(b.leads);
		free(b.order);
		return gp_diag_oom(b.r->diag, NULL);
	}
	int64_t wmax = 0;
	for (size_t i = 0; i < r->net_count; i++) {
		struct netstate *ns = &r->nets[i];
		if (ns->ledge != index || !ns->bundle)
			continue;
		const struct cand *c = &ns->cands[ns->chosen];
		struct blead *bl = &b.leads[b.count++];
		bl->net = (int)i;
		struct gp_point at = c->at;
		switch (c->side) {
		case GP_SIDE_BOTTOM: at.y += c->reach; break;
		case GP_SIDE_TOP: at.y -= c->reach; break;
		case GP_SIDE_LEFT: at.x += c->reach; break;
		default: at.x -= c->reach; break;
		}
		bl->start = to_canon(l->side, at);
		bl->plate = r->build->art.nets[i].plate;
		bl->w = gp_route_lead_width(r, ns, c);
		bl->wf = ns->transfer ? r->g->transfers.size +
						2 * r->g->transfers.margin
				      : bl->w;
		wmax = max64(wmax, bl->w);
	}
	/* from the other plate: any shift of up to the registration in x
	 * and in y, so its diagonal */
	int64_t shift = (int64_t)ceil((double)rules->registration * SQRT2) +
			rules->chord_tolerance;
	b.clear = max64(r->min_space, shift) + wmax / 2;
	b.shift = shift;
	b.space = r->space;
	struct gp_box in = box_map(r->s_in, l->side, true);
	b.lo = in.x0 + b.clear;
	b.hi = in.x1 - b.clear;
	b.y_seal = in.y0;
	bool ok = collect_obstacles(&b) && sweep(&b);
	for (size_t k = 0; ok && k < b.count; k++) {
		struct blead *bl = &b.leads[k];
		struct netstate *ns = &r->nets[bl->net];
		struct gp_point *path = malloc((size_t)bl->n * sizeof(*path));
		if (!path) {
			ok = gp_diag_oom(b.r->diag, NULL);
			break;
		}
		for (int q = 0; q < bl->n; q++)
			path[q] = from_canon(l->side, bl->pts[q]);
		free(ns->path);
		ns->path = path;
		ns->path_count = (size_t)bl->n;
		ns->path_width = bl->w;
		gp_polygon_finish(&ns->path_poly);
		gp_polygon_init(&ns->path_poly);
		if (bl->n >= 2 && !gp_route_path_polygon(path, (size_t)bl->n, bl->w,
							 &ns->path_poly)) {
			ok = gp_diag_oom(b.r->diag, NULL);
			break;
		}
		/* the lead crosses the seal from where it arrives */
		struct cand *c = &ns->cands[ns->chosen];
		c->at = path[bl->n - 1];
		c->width = bl->w;
		c->reach = 0;
		ns->corridor = gp_route_corridor(r, c, ns->ext);
		ns->decided = true;
	}
	if (!ok && b.culprit >= 0)
		*culprit = b.culprit;
	free(b.obs);
	free(b.leads);
	free(b.order);
	return ok;
}
