/* Routing one ledge: the order of its leads round the seal, its pads,
 * the tracks round the seal and the fan-out to the pads; and which nets go
 * to which pads (explicit pin map or automatic).  See route.h. */
#include "route-private.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* --- shapes ------------------------------------------------------------------ */

/* Orientation of c against the line a->b: -1, 0, +1.  In long double:
 * exact for the few millimetres a lead's outline spans (products below
 * 2^64 nm^2); a wrong answer for far larger shapes only costs a repair
 * that was not needed. */
static int turn(struct gp_point a, struct gp_point b, struct gp_point c)
{
	long double v = (long double)(b.x - a.x) * (long double)(c.y - a.y) -
			(long double)(b.y - a.y) * (long double)(c.x - a.x);
	return (v > 0) - (v < 0);
}

static bool on_segment(struct gp_point a, struct gp_point b, struct gp_point c)
{
	return c.x >= (a.x < b.x ? a.x : b.x) && c.x <= (a.x > b.x ? a.x : b.x) &&
	       c.y >= (a.y < b.y ? a.y : b.y) && c.y <= (a.y > b.y ? a.y : b.y);
}

static bool segments_meet(struct gp_point a, struct gp_point b,
			  struct gp_point c, struct gp_point d)
{
	int d1 = turn(c, d, a), d2 = turn(c, d, b);
	int d3 = turn(a, b, c), d4 = turn(a, b, d);
	if (d1 * d2 < 0 && d3 * d4 < 0)
		return true;
	return (d1 == 0 && on_segment(c, d, a)) ||
	       (d2 == 0 && on_segment(c, d, b)) ||
	       (d3 == 0 && on_segment(a, b, c)) ||
	       (d4 == 0 && on_segment(a, b, d));
}

/* No two edges of the ring meet but neighbours at their shared corner. */
static bool ring_simple(const struct gp_ring *ring)
{
	size_t n = ring->count;
	for (size_t i = 0; i < n; i++) {
		struct gp_point a = ring->points[i], b = ring->points[(i + 1) % n];
		for (size_t j = i + 2; j < n; j++) {
			if (i == 0 && j == n - 1)
				continue;
			if (segments_meet(a, b, ring->points[j],
					  ring->points[(j + 1) % n]))
				return false;
		}
	}
	return true;
}

/* A jog shorter than the lead is wide folds the mitred outline over
 * itself (GEOS then refuses it: "Self-intersection"); the outline is
 * filled by the nonzero rule instead, which is the lead's area. */
static bool repair_outline(struct gp_polygon *poly)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_geos *geos = gp_geos_create(&diag);
	struct gp_polyset out;
	gp_polyset_init(&out);
	bool ok = geos && gp_geos_make_valid(geos, &poly->outer, 1,
					     GP_FILL_NONZERO, &out) &&
		  out.count > 0;
	if (ok) {
		/* one piece: the path is connected */
		size_t best = 0;
		for (size_t k = 1; k < out.count; k++)
			if (gp_polygon_area_mm2(&out.items[k]) >
			    gp_polygon_area_mm2(&out.items[best]))
				best = k;
		gp_polygon_finish(poly);
		*poly = out.items[best];
		gp_polygon_init(&out.items[best]);
	}
	gp_polyset_finish(&out);
	gp_geos_destroy(geos);
	gp_diag_finish(&diag);
	return ok;
}

/* Outline of a path of straight segments of width w with mitred corners
 * (corners here are 45 or 90 degrees, so mitres stay short). */
bool gp_route_path_polygon(const struct gp_point *p, size_t n, int64_t w,
			   struct gp_polygon *poly)
{
	double h = (double)w / 2;
	double *nx = malloc(n * sizeof(double)), *ny = malloc(n * sizeof(double));
	bool ok = nx && ny;
	for (size_t i = 0; ok && i + 1 < n; i++) {
		double dx = (double)(p[i + 1].x - p[i].x);
		double dy = (double)(p[i + 1].y - p[i].y);
		double len = sqrt(dx * dx + dy * dy);
		nx[i] = -dy / len;
		ny[i] = dx / len;
	}
	for (int side = 1; ok && side >= -1; side -= 2) {
		for (size_t k = 0; k < n; k++) {
			size_t i = side > 0 ? k : n - 1 - k;
			double ox, oy;
			if (i == 0) {
				ox = nx[0], oy = ny[0];
			} else if (i == n - 1) {
				ox = nx[n - 2], oy = ny[n - 2];
			} else {
				double d = 1 + nx[i - 1] * nx[i] +
					   ny[i - 1] * ny[i];
				ox = (nx[i - 1] + nx[i]) / d;
				oy = (ny[i - 1] + ny[i]) / d;
			}
			ok &= gp_ring_push(&poly->outer,
					   p[i].x + llround(side * h * ox),
					   p[i].y + llround(side * h * oy));
		}
	}
	free(nx);
	free(ny);
	if (ok && !ring_simple(&poly->outer))
		ok = repair_outline(poly);
	if (ok)
		gp_polygon_normalize(poly);
	return ok;
}

static bool add_path(struct route *r, enum gp_plate plate, int net,
		     const struct gp_point *p, size_t n, int64_t w)
{
	struct gp_polygon poly;
	gp_polygon_init(&poly);
	bool ok = n >= 2 && gp_route_path_polygon(p, n, w, &poly) &&
		  gp_artwork_add_shape(&r->build->art, gp_plate_ito_layer(plate),
				       GP_ROLE_LEAD, net, &poly);
	gp_polygon_finish(&poly);
	return ok;
}

/* --- per ledge: order, pads, tracks, fan-out ---------------------------------- */

struct item {
	int net;
	enum gp_side side;        /* canonical */
	int64_t pos;              /* canonical coordinate along the side */
	int64_t width;            /* narrow lead width */
	int group;                /* 0 top-left, 1 left, 2 bottom, 3 right, 4 top-right */
	int64_t key;
	int pin;                  /* index into build->pins */
	int64_t pad;              /* canonical pad centre x */
	int64_t track;            /* track coordinate (x for sides, y for top) */
	int64_t top_track;        /* y of the track above the seal */
	int64_t arrive;           /* x where it enters the fan-out */
	int64_t ytop, ybot;      /* diagonal fan-out */
	bool orth;               /* fan-out with a horizontal run */
	int64_t level_y, chamfer;
};

static int compare_items(const void *a, const void *b)
{
	const struct item *x = a, *y = b;
	if (x->group != y->group)
		return x->group < y->group ? -1 : 1;
	if (x->key != y->key)
		return x->key < y->key ? -1 : 1;
	return (x->net > y->net) - (x->net < y->net);
}

struct ledge_ctx {
	struct route *r;
	struct gp_ledge *l;
	int index;
	struct gp_box out;        /* seal outer edge, canonical */
	struct gp_box plate;      /* ledge plate, canonical */
	struct item *items;
	size_t count;
	int64_t clear;            /* edge clearance for leads */
};

/* "COM1-COM8, SEG1-SEG80, COM16-COM9" */
static void describe_order(const struct route *r, const int *nets, size_t n,
			   char *out, size_t size)
{
	size_t used = 0;
	out[0] = '\0';
	for (size_t i = 0; i < n && used + 1 < size;) {
		size_t j = i;
		const struct gp_net *a = nets[i] >= 0 ? &r->build->art.nets[nets[i]] : NULL;
		int step = 0;
		while (a && j + 1 < n && nets[j + 1] >= 0) {
			const struct gp_net *b = &r->build->art.nets[nets[j + 1]];
			const struct gp_net *p = &r->build->art.nets[nets[j]];
			int d = b->number - p->number;
			if (b->kind != a->kind || (d != 1 && d != -1) ||
			    (step && d != step))
				break;
			step = d;
			j++;
		}
		if (j > i)
			used += (size_t)snprintf(out + used, size - used,
						 "%s%s-%s", i ? ", " : "",
						 net_name(r, nets[i]),
						 net_name(r, nets[j]));
		else
			used += (size_t)snprintf(out + used, size - used,
						 "%s%s", i ? ", " : "",
						 net_name(r, nets[i]));
		if (used >= size)
			used = size - 1;
		i = j + 1;
	}
}

static bool make_items(struct ledge_ctx *c)
{
	struct route *r = c->r;
	size_t n = 0;
	for (size_t i = 0; i < r->net_count; i++)
		if (r->nets[i].ledge == c->index)
			n++;
	c->items = calloc(n ? n : 1, sizeof(*c->items));
	if (!c->items)
		return gp_diag_oom(r->diag, NULL);
	int64_t cut = (c->out.x0 + c->out.x1) / 2;
	for (size_t i = 0; i < r->net_count; i++) {
		struct netstate *ns = &r->nets[i];
		if (ns->ledge != c->index)
			continue;
		const struct cand *cd = &ns->cands[ns->chosen];
		struct item *it = &c->items[c->count++];
		struct gp_point at = to_canon(c->l->side, cd->at);
		it->net = (int)i;
		it->side = side_to_canon(c->l->side, cd->side);
		it->pos = it->side == GP_SIDE_BOTTOM || it->side == GP_SIDE_TOP
				  ? at.x
				  : at.y;
		it->width = gp_route_lead_width(r, ns, cd);
		it->pin = ns->pin;
		switch (it->side) {
		case GP_SIDE_BOTTOM: it->group = 2, it->key = it->pos; break;
		case GP_SIDE_LEFT: it->group = 1, it->key = -it->pos; break;
		case GP_SIDE_RIGHT: it->group = 3, it->key = it->pos; break;
		default:
			it->group = it->pos < cut ? 0 : 4;
			it->key = -it->pos;
			break;
		}
	}
	qsort(c->items, c->count, sizeof(*c->items), compare_items);
	return true;
}

/* Leads leaving one side must be far enough apart outside the seal. */
static bool check_exit_spacing(struct ledge_ctx *c)
{
	for (size_t i = 0; i + 1 < c->count; i++) {
		struct item *a = &c->items[i], *b = &c->items[i + 1];
		if (a->side != b->side)
			continue;
		int64_t need = (a->width + b->width) / 2 + c->r->space;
		int64_t have = a->pos > b->pos ? a->pos - b->pos : b->pos - a->pos;
		if (have < need) {
			char x[32], y[32];
			return gp_diag_error(
				c->r->diag, &c->l->where,
				"ledge '%s': the leads of %s and %s leave the "
				"seal %s mm apart (centre to centre); they "
				"need %s mm (lead width plus space)",
				c->l->name, net_name(c->r, a->net),
				net_name(c->r, b->net), mm(x, have),
				mm(y, need));
		}
	}
	return true;
}

/* Pad boxes of pins first.. first + count - 1 from the ledge's pin 1:
 * the span is the datum, pad k sits at pin1 + k * pitch directly. */
static void place_pads(struct route *r, const struct gp_ledge *l,
		       size_t first, size_t count)
{
	struct gp_box plate = plate_box(r->design, l->plate);
	bool across = l->side == GP_SIDE_BOTTOM || l->side == GP_SIDE_TOP;
	int64_t edge = box_edge(plate, l->side);
	int sign = l->side == GP_SIDE_BOTTOM || l->side == GP_SIDE_LEFT ? 1 : -1;
	int64_t near = edge + sign * l->edge_clearance;
	int64_t far = near + sign * l->pad_length;
	for (size_t k = 0; k < count; k++) {
		int64_t along = l->pin1 + l->direction * (int64_t)k * l->pitch;
		int64_t w0 = l->pad_width / 2, w1 = l->pad_width - w0;
		struct gp_pin *p = &r->build->pins[first + k];
		p->box = across ? gp_box_make(along - w0, min64(near, far),
					      along + w1, max64(near, far))
				: gp_box_make(min64(near, far), along - w0,
					      max64(near, far), along + w1);
		p->centre = across ? (struct gp_point){ along, (near + far) / 2 }
				   : (struct gp_point){ (near + far) / 2, along };
	}
}

/* Pads a ledge's side has room for at its pitch. */
static size_t ledge_capacity(const struct route *r, const struct gp_ledge *l)
{
	struct gp_box plate = plate_box(r->design, l->plate);
	bool across = l->side == GP_SIDE_BOTTOM || l->side == GP_SIDE_TOP;
	int64_t room = (across ? plate.x1 - plate.x0 : plate.y1 - plate.y0) -
		       2 * r->design->rules.edge_clearance;
	if (room < l->pad_width || l->pitch <= 0)
		return 0;
	return (size_t)((room - l->pad_width) / l->pitch) + 1;
}

/* For a ledge too short: the nets it was to carry, the finest pitch
 * that fits (pads kept in proportion) and the other ledges with room. */
static void too_short_advice(const struct route *r, int index, size_t count,
			     int64_t room, char *out, size_t size)
{
	const struct gp_ledge *l = &r->ledges[index];
	size_t used = 0;
	int *nets = malloc((count ? count : 1) * sizeof(*nets));
	size_t n = 0;
	for (size_t i = 0; nets && i < r->net_count && n < count; i++)
		if (r->nets[i].ledge == index)
			nets[n++] = (int)i;
	char list[512] = "";
	if (nets && n)
		describe_order(r, nets, n, list, sizeof(list));
	free(nets);
	used += (size_t)snprintf(out, size, "; it carries %s",
				 n ? list : "the nets of its pin map");
	double ratio = (double)l->pad_width / (double)l->pitch;
	if (count > 1 && used < size) {
		int64_t p = (int64_t)floor((double)room /
					   ((double)(count - 1) + ratio) / 1000) *
			    1000;
		char a[32], b[32];
		used += (size_t)snprintf(out + used, size - used,
					 "; a pitch of %s mm with %s mm pads "
					 "would fit (check it suits the "
					 "connector)", mm(a, p),
					 mm(b, (int64_t)floor((double)p * ratio /
							      1000) * 1000));
	}
	for (size_t j = 0; j < r->g->ledge_count && used < size; j++) {
		if ((int)j == index)
			continue;
		size_t on = 0;
		for (size_t i = 0; i < r->net_count; i++)
			on += r->nets[i].ledge == (int)j;
		size_t cap = ledge_capacity(r, &r->ledges[j]);
		if (cap <= on)
			continue;
		used += (size_t)snprintf(out + used, size - used,
					 "; ledge '%s' has room for %zu more "
					 "pad(s)%s (name nets or elements in "
					 "its 'carries')", r->ledges[j].name,
					 cap - on,
					 cap - on >= count ? ", enough for all"
							   : "");
	}
	if (used >= size)
		out[size - 1] = '\0';
}

/* Pads of the ledge in the real frame, numbered; with a pin map the nets
 * are already on them. */
static bool make_pads(struct route *r, struct gp_ledge *l, int index,
		      size_t count, int first_pin)
{
	const struct gp_design *d = r->design;
	struct gp_box plate = plate_box(d, l->plate);
	bool across = l->side == GP_SIDE_BOTTOM || l->side == GP_SIDE_TOP;
	int64_t lo = across ? plate.x0 : plate.y0;
	int64_t hi = across ? plate.x1 : plate.y1;
	int64_t clear = d->rules.edge_clearance;
	int64_t span = (int64_t)(count - 1) * l->pitch;
	char a[32], b[32], c[32], e[32], f[32], g[32];
	if ((int64_t)count * l->pitch > hi - lo - 2 * clear + l->pitch - l->pad_width) {
		char more[1024];
		too_short_advice(r, index, count, hi - lo - 2 * clear, more,
				 sizeof(more));
		return gp_diag_error(
			r->diag, &l->where,
			"ledge '%s' is too short: %zu pads need %zu x (%s + "
			"%s) = %s mm along the %s of the %s plate, but only "
			"%s mm is available (%s mm between the edge "
			"clearances and the %s mm gap the last pad does not "
			"need)%s",
			l->name, count, count, mm(a, l->pad_width),
			mm(b, l->pitch - l->pad_width),
			mm(c, (int64_t)count * l->pitch), gp_side_name(l->side),
			l->plate == GP_PLATE_FRONT ? "front" : "back",
			mm(e, hi - lo - 2 * clear + l->pitch - l->pad_width),
			mm(f, hi - lo - 2 * clear), mm(g, l->pitch - l->pad_width),
			more);
	}
	if (!l->pin1_given)
		l->pin1 = (lo + hi) / 2 - l->direction * (span / 2);
	int64_t first = l->pin1, last = l->pin1 + l->direction * span;
	int64_t low = min64(first, last) - l->pad_width / 2;
	int64_t high = max64(first, last) + l->pad_width - l->pad_width / 2;
	if (low < lo + clear || high > hi - clear)
		return gp_diag_error(
			r->diag, &l->where,
			"ledge '%s': the pad row runs from %s to %s mm but "
			"the ledge, less the edge clearance, is from %s to "
			"%s mm; move 'pin1'",
			l->name, mm(a, low), mm(b, high), mm(c, lo + clear),
			mm(e, hi - clear));
	/* across the ledge: from the edge clearance inwards */
	int64_t edge = box_edge(plate, l->side);
	int sign = l->side == GP_SIDE_BOTTOM || l->side == GP_SIDE_LEFT ? 1 : -1;
	int64_t near = edge + sign * l->edge_clearance;
	int64_t far = near + sign * l->pad_length;
	struct gp_box other = plate_box(d, l->plate == GP_PLATE_FRONT
						   ? GP_PLATE_BACK
						   : GP_PLATE_FRONT);
	int64_t other_edge = box_edge(other, l->side);
	if ((sign > 0 && far > other_edge) || (sign < 0 && far < other_edge))
		return gp_diag_error(
			r->diag, &l->where,
			"ledge '%s': pads end at %s mm, under the other plate "
			"(its edge is at %s mm); shorten 'pad_length' or "
			"'edge_clearance'",
			l->name, mm(a, far), mm(b, other_edge));
	for (size_t k = 0; k < count; k++) {
		struct gp_pin *p = &r->build->pins[r->build->pin_count++];
		p->number = first_pin + (int)k;
		p->ledge = index;
		p->net = GP_NET_NONE;
	}
	place_pads(r, l, r->build->pin_count - count, count);
	return true;
}

/* Tracks of the leads that go round the left (or, mirrored, right) of the
 * seal: the first in walking order is outermost. */
static bool side_tracks(struct ledge_ctx *c, size_t from, size_t to,
			bool left)
{
	struct route *r = c->r;
	if (from == to)
		return true;
	int64_t edge = left ? c->out.x0 : c->out.x1;
	int64_t sign = left ? -1 : 1;
	int64_t at = edge + sign * (c->r->nets[c->items[from].net].ext +
				    r->space);
	int64_t need = 0;
	/* inner to outer */
	for (size_t k = 0; k < to - from; k++) {
		size_t i = left ? to - 1 - k : from + k;
		struct item *it = &c->items[i];
		it->track = at + sign * (it->width / 2);
		at += sign * (it->width + r->space);
		need += it->width + r->space;
	}
	int64_t limit = left ? c->plate.x0 + c->clear : c->plate.x1 - c->clear;
	int64_t last = at - sign * r->space;
	if ((left && last >= limit) || (!left && last <= limit))
		return true;
	char a[32], b[32], d[32], e[32];
	enum gp_side real = side_from_canon(c->l->side,
					    left ? GP_SIDE_LEFT : GP_SIDE_RIGHT);
	int64_t have = left ? edge - limit : limit - edge;
	have -= r->nets[c->items[from].net].ext + r->space;
	char f[32];
	int64_t each = have > 0 ? have / (int64_t)(to - from) / 1000 * 1000 : 0;
	return gp_diag_error(
		r->diag, &c->l->where,
		"ledge '%s': %zu leads (%s to %s) pass the %s of the seal "
		"outside it; they need %zu x (%s + %s) = %s mm but only %s "
		"mm is free there between the seal and the edge clearance; "
		"leads.width + leads.space of at most %s mm would fit, or a "
		"ledge on the %s could carry them (name them in its "
		"'carries')",
		c->l->name, to - from, net_name(r, c->items[from].net),
		net_name(r, c->items[to - 1].net), gp_side_name(real),
		to - from, mm(a, c->items[from].width), mm(b, r->space),
		mm(d, need), mm(e, have > 0 ? have : 0), mm(f, each),
		gp_side_name(real));
}

static bool top_tracks(struct ledge_ctx *c, size_t from, size_t to,
		       bool left)
{
	struct route *r = c->r;
	if (from == to)
		return true;
	int64_t at = c->out.y1 + r->nets[c->items[from].net].ext + r->space;
	int64_t need = 0;
	for (size_t k = 0; k < to - from; k++) {
		/* left part: the first (nearest the cut) is outermost */
		size_t i = left ? to - 1 - k : from + k;
		struct item *it = &c->items[i];
		it->top_track = at + it->width / 2;
		at += it->width + r->space;
		need += it->width + r->space;
	}
	if (at - r->space <= c->plate.y1 - c->clear)
		return true;
	char a[32], b[32], d[32], e[32];
	enum gp_side real = side_from_canon(c->l->side, GP_SIDE_TOP);
	int64_t have = c->plate.y1 - c->clear - c->out.y1 -
		       r->nets[c->items[from].net].ext - r->space;
	return gp_diag_error(
		r->diag, &c->l->where,
		"ledge '%s': %zu leads (%s to %s) leave the %s of the seal "
		"and go round it; they need %zu x (%s + %s) = %s mm but only "
		"%s mm is free there",
		c->l->name, to - from, net_name(r, c->items[from].net),
		net_name(r, c->items[to - 1].net), gp_side_name(real),
		to - from, mm(a, c->items[from].width), mm(b, r->space),
		mm(d, need), mm(e, have > 0 ? have : 0));
}

/* The fan-out from the arrivals to the pads works on runs: maximal
 * stretches of neighbours that move the same way.  Leads of different runs
 * never share an x (a lead moving right lies in [arrive, pad], the next
 * one moving left in [pad', arrive'] with pad' >= pad + w + s), so each run
 * takes whichever form fits. */
static int direction(const struct item *it)
{
	return (it->pad > it->arrive) - (it->pad < it->arrive);
}

/* 45-degree form: leads moving the same way start their diagonals in a
 * staircase so that parallel diagonals keep lead width plus space between
 * them (their centre lines x + y = const then differ by at least
 * sqrt(2) (w + s)).  False when some lead would reach below y_pad. */
static bool fan_diagonal(struct ledge_ctx *c, size_t from, size_t to,
			 int64_t y_gather, int64_t y_pad)
{
	struct route *r = c->r;
	struct item *it = c->items;
	for (size_t i = from; i < to; i++)
		it[i].ytop = y_gather, it[i].orth = false;
	for (size_t i = to; i-- > from + 1;) {
		struct item *a = &it[i - 1], *b = &it[i];
		int64_t g = (a->width + b->width) / 2 + r->space;
		int64_t need = (int64_t)ceil(SQRT2 * (double)g) + 2;
		if (direction(a) > 0)
			a->ytop = min64(y_gather, b->ytop + (b->arrive - a->arrive) - need);
	}
	for (size_t i = from + 1; i < to; i++) {
		struct item *a = &it[i - 1], *b = &it[i];
		int64_t g = (a->width + b->width) / 2 + r->space;
		int64_t need = (int64_t)ceil(SQRT2 * (double)g) + 2;
		if (direction(b) < 0)
			b->ytop = min64(y_gather, a->ytop + (b->arrive - a->arrive) - need);
	}
	bool fits = true;
	for (size_t i = from; i < to; i++) {
		int64_t shift = it[i].pad - it[i].arrive;
		it[i].ybot = it[i].ytop - (shift < 0 ? -shift : shift);
		fits &= it[i].ybot - it[i].width >= y_pad;
	}
	return fits;
}

/* Form with horizontal runs, for shifts too long to make at 45 degrees:
 * each lead goes down, along its level, and down to its pad, with its
 * corners cut at 45 degrees.  Of two neighbours whose runs overlap, the
 * one ahead takes the higher level, so no run crosses a neighbour's drop.
 * Levels are (widest lead + space) apart; corner cuts are at most half
 * that, so cut corners of neighbours stay more than sqrt(2) (w + s) apart
 * along their diagonals. */
static bool fan_levels(struct ledge_ctx *c, size_t from, size_t to,
		       int64_t y_gather, int64_t y_pad)
{
	struct route *r = c->r;
	struct item *it = c->items;
	int64_t maxw = 0;
	for (size_t i = 0; i < c->count; i++)
		maxw = max64(maxw, it[i].width);
	int64_t step = maxw + r->space, cut = step / 2;
	int dir = direction(&it[from]);
	long *level = calloc(to - from, sizeof(*level));
	if (!level)
		return gp_diag_oom(r->diag, NULL);
	if (dir > 0) {
		for (size_t i = to; i-- > from + 1;)
			if (it[i - 1].pad + step > it[i].arrive)
				level[i - 1 - from] = level[i - from] + 1;
	} else {
		for (size_t i = from + 1; i < to; i++)
			if (it[i].pad - step < it[i - 1].arrive)
				level[i - from] = level[i - 1 - from] + 1;
	}
	long most = 0;
	size_t deepest = from;
	for (size_t i = from; i < to; i++) {
		int64_t shift = it[i].pad - it[i].arrive;
		int64_t mag = shift < 0 ? -shift : shift;
		if (level[i - from] > most)
			most = level[i - from], deepest = i;
		it[i].orth = true;
		it[i].level_y = y_gather - cut - level[i - from] * step;
		it[i].chamfer = min64(cut, mag / 2);
	}
	free(level);
	/* room: levels from y_gather - cut down, the lowest still a corner
	 * cut and a lead width above the pads */
	int64_t need = (most + 1) * step;
	int64_t have = y_gather - y_pad - 2 * cut - maxw + step;
	if (need <= have)
		return true;
	/* the chain of leads stacked with the deepest */
	size_t first = deepest, last = deepest;
	while (dir > 0 && last + 1 < to &&
	       it[last].pad + step > it[last + 1].arrive)
		last++;
	while (dir < 0 && first > from &&
	       it[first].pad - step < it[first - 1].arrive)
		first--;
	char a[32], b[32], d[32], e[32];
	return gp_diag_error(
		r->diag, &c->l->where,
		"ledge '%s': to fan out to the pads, %ld leads (%s to %s) must "
		"run sideways one above the other between the seal and the "
		"pads; they need %ld x (%s + %s) = %s mm but only %s mm is "
		"free there; make the ledge deeper, move the seal or bring "
		"the pad pitch closer to the electrode pitch",
		c->l->name, most + 1, net_name(r, it[first].net),
		net_name(r, it[last].net), most + 1, mm(a, maxw),
		mm(b, r->space), mm(d, need), mm(e, have > 0 ? have : 0));
}

static bool fan_out(struct ledge_ctx *c, int64_t y_gather, int64_t y_pad)
{
	struct item *it = c->items;
	for (size_t from = 0; from < c->count;) {
		size_t to = from + 1;
		int dir = direction(&it[from]);
		while (dir != 0 && to < c->count && direction(&it[to]) == dir)
			to++;
		if (dir == 0) {
			it[from].orth = false;
			it[from].ytop = it[from].ybot = y_gather;
		} else if (!fan_diagonal(c, from, to, y_gather, y_pad) &&
			   !fan_levels(c, from, to, y_gather, y_pad)) {
			return false;
		}
		from = to;
	}
	return true;
}

struct pathbuf {
	struct gp_point *p;
	size_t n, cap;
	bool lost;                /* out of memory */
};

static int sgn(int64_t v)
{
	return (v > 0) - (v < 0);
}

static void push(struct pathbuf *b, int64_t x, int64_t y)
{
	struct gp_point q = { x, y };
	if (b->n && b->p[b->n - 1].x == x && b->p[b->n - 1].y == y)
		return;
	if (b->n >= 2) {
		struct gp_point u = b->p[b->n - 2], v = b->p[b->n - 1];
		/* drop v when u->v and v->q run the same way (segments
		 * here are horizontal, vertical or at 45 degrees) */
		if (sgn(v.x - u.x) == sgn(q.x - v.x) &&
		    sgn(v.y - u.y) == sgn(q.y - v.y)) {
			b->p[b->n - 1] = q;
			return;
		}
	}
	if (b->n == b->cap) {
		size_t cap = b->cap ? 2 * b->cap : 16;
		struct gp_point *grown = realloc(b->p, cap * sizeof(*grown));
		if (!grown) {
			b->lost = true;
			return;
		}
		b->p = grown;
		b->cap = cap;
	}
	b->p[b->n++] = q;
}

static bool build_paths(struct ledge_ctx *c, int64_t y_pad_centre)
{
	struct route *r = c->r;
	enum gp_plate plate = c->l->plate;
	for (size_t i = 0; i < c->count; i++) {
		struct item *it = &c->items[i];
		struct netstate *ns = &r->nets[it->net];
		int64_t ov = it->width / 2;   /* overlap into the wide part */
		int64_t start_out = ns->ext;
		struct pathbuf b = { .p = NULL };
		switch (it->side) {
		case GP_SIDE_BOTTOM:
			push(&b, it->pos, c->out.y0 - start_out + ov);
			break;
		case GP_SIDE_LEFT:
			push(&b, c->out.x0 - start_out + ov, it->pos);
			break;
		case GP_SIDE_RIGHT:
			push(&b, c->out.x1 + start_out - ov, it->pos);
			break;
		default:
			push(&b, it->pos, c->out.y1 + start_out - ov);
			push(&b, it->pos, it->top_track);
			break;
		}
		if (it->side != GP_SIDE_BOTTOM) {
			if (it->side == GP_SIDE_TOP)
				push(&b, it->track, it->top_track);
			else
				push(&b, it->track, it->pos);
		}
		if (it->orth) {
			int64_t k = it->chamfer;
			int s = sgn(it->pad - it->arrive);
			push(&b, it->arrive, it->level_y + k);
			push(&b, it->arrive + s * k, it->level_y);
			push(&b, it->pad - s * k, it->level_y);
			push(&b, it->pad, it->level_y - k);
		} else {
			push(&b, it->arrive, it->ytop);
			push(&b, it->pad, it->ybot);
		}
		push(&b, it->pad, y_pad_centre);
		for (size_t k = 0; k < b.n; k++)
			b.p[k] = from_canon(c->l->side, b.p[k]);
		bool ok = !b.lost &&
			  add_path(r, plate, it->net, b.p, b.n, it->width);
		free(b.p);
		if (!ok)
			return gp_diag_oom(r->diag, NULL);
	}
	return true;
}

/* Pins of a ledge from its explicit map: nets onto pads. */
static int find_net(const struct route *r, const char *name)
{
	for (size_t i = 0; i < r->net_count; i++)
		if (strcmp(r->build->art.nets[i].name, name) == 0)
			return (int)i;
	return -1;
}

static int first_pin_number(const struct route *r, int ledge)
{
	int best = 0;
	for (size_t i = 0; i < r->build->pin_count; i++)
		if (r->build->pins[i].ledge == ledge &&
		    (best == 0 || r->build->pins[i].number < best))
			best = r->build->pins[i].number;
	return best;
}

static bool check_planar(struct ledge_ctx *c)
{
	struct route *r = c->r;
	for (size_t i = 0; i + 1 < c->count; i++) {
		struct item *a = &c->items[i], *b = &c->items[i + 1];
		if (a->pad < b->pad)
			continue;
		/* suggest: the same pads in walking order */
		size_t n = c->count;
		int64_t *pads = malloc(n * sizeof(*pads));
		int *order = malloc(n * sizeof(*order));
		char text[2048];
		if (!pads || !order) {
			free(pads);
			free(order);
			return gp_diag_oom(r->diag, NULL);
		}
		for (size_t k = 0; k < n; k++)
			pads[k] = c->items[k].pad;
		for (size_t k = 1; k < n; k++)
			for (size_t j = k; j > 0 && pads[j] < pads[j - 1]; j--) {
				int64_t t = pads[j];
				pads[j] = pads[j - 1];
				pads[j - 1] = t;
			}
		/* pads sorted by canonical x get items in walking order;
		 * list them by pin number */
		size_t m = 0;
		struct gp_pin *pins = r->build->pins;
		for (size_t p = 0; p < r->build->pin_count; p++) {
			if (pins[p].ledge != c->index)
				continue;
			int64_t x = to_canon(c->l->side, pins[p].centre).x;
			int net = GP_NET_NONE;
			for (size_t k = 0; k < n; k++)
				if (pads[k] == x)
					net = c->items[k].net;
			order[m++] = net;
			if (m == n)
				break;
		}
		describe_order(r, order, m, text, sizeof(text));
		free(pads);
		free(order);
		const struct gp_node *map = c->l->map;
		return gp_diag_error(
			r->diag, map ? &map->where : &c->l->where,
			"pin map of ledge '%s' makes the leads of %s (pin %d) "
			"and %s (pin %d) cross: they leave the seal in the "
			"order %s, %s walking round it towards the ledge; a "
			"routable order from pin %d is: %s",
			c->l->name, net_name(r, a->net),
			r->build->pins[a->pin].number, net_name(r, b->net),
			r->build->pins[b->pin].number, net_name(r, a->net),
			net_name(r, b->net),
			first_pin_number(r, c->index), text);
	}
	return true;
}

/* With no pin 1 given, the pad row goes where it makes the leads that
 * leave the seal towards the ledge move sideways least: under the middle
 * of (arrival - k * pitch), k counted along the row, kept on the ledge.
 * (Leads coming round the seal arrive bunched in tracks; they take the
 * form with horizontal runs whatever their shift.) */
static void centre_row(struct ledge_ctx *c, size_t first)
{
	struct route *r = c->r;
	struct gp_ledge *l = c->l;
	size_t n = c->count;
	if (n == 0)
		return;
	int64_t lo = INT64_MAX, hi = INT64_MIN;
	bool any = false;
	for (size_t k = 0; k < n; k++)
		any |= c->items[k].side == GP_SIDE_BOTTOM;
	for (size_t k = 0; k < n; k++) {
		if (any && c->items[k].side != GP_SIDE_BOTTOM)
			continue;
		int64_t v = c->items[k].arrive - (int64_t)k * l->pitch;
		lo = min64(lo, v);
		hi = max64(hi, v);
	}
	int64_t q0 = lo + (hi - lo) / 2;   /* canonical x of the lowest pad */
	/* canonical x runs with real x (bottom), -x (top), -y (left), y */
	int sgnc = l->side == GP_SIDE_BOTTOM || l->side == GP_SIDE_RIGHT ? 1 : -1;
	int64_t span = (int64_t)(n - 1) * l->pitch;
	int64_t low_end = sgnc > 0 ? q0 : -(q0 + span);   /* real, lowest pad */
	struct gp_box plate = plate_box(r->design, l->plate);
	bool across = l->side == GP_SIDE_BOTTOM || l->side == GP_SIDE_TOP;
	int64_t clear = r->design->rules.edge_clearance;
	int64_t min_c = (across ? plate.x0 : plate.y0) + clear + l->pad_width / 2;
	int64_t max_c = (across ? plate.x1 : plate.y1) - clear -
			(l->pad_width - l->pad_width / 2) - span;
	if (low_end > max_c)
		low_end = max_c;
	if (low_end < min_c)
		low_end = min_c;
	l->pin1 = l->direction > 0 ? low_end : low_end + span;
	place_pads(r, l, first, n);
}

bool gp_route_ledge(struct route *r, int index)
{
	struct ledge_ctx c = {
		.r = r,
		.l = &r->ledges[index],
		.index = index,
		.clear = r->design->rules.edge_clearance,
	};
	c.out = box_map(r->s_out, c.l->side, true);
	c.plate = box_map(plate_box(r->design, c.l->plate), c.l->side, true);
	bool ok = make_items(&c) && check_exit_spacing(&c);
	if (!ok)
		goto out;
	/* groups: [0, nl) go round the left, [nr, count) round the right */
	size_t nl = 0, nt = 0, nr = c.count, nt2 = c.count;
	while (nl < c.count && c.items[nl].group <= 1)
		nl++;
	while (nt < c.count && c.items[nt].group == 0)
		nt++;
	while (nr > 0 && c.items[nr - 1].group >= 3)
		nr--;
	while (nt2 > 0 && c.items[nt2 - 1].group == 4)
		nt2--;
	ok = side_tracks(&c, 0, nl, true) && side_tracks(&c, nr, c.count, false) &&
	     top_tracks(&c, 0, nt, true) && top_tracks(&c, nt2, c.count, false);
	if (!ok)
		goto out;
	int64_t bottom_ext = 0, maxw = 0;
	for (size_t i = 0; i < c.count; i++) {
		struct item *it = &c.items[i];
		it->arrive = it->side == GP_SIDE_BOTTOM ? it->pos : it->track;
		maxw = max64(maxw, it->width);
		if (it->side == GP_SIDE_BOTTOM)
			bottom_ext = max64(bottom_ext, r->nets[it->net].ext);
	}
	for (size_t i = 0; i < c.count; i++)
		c.items[i].arrive = c.items[i].side == GP_SIDE_BOTTOM
					    ? c.items[i].pos
					    : c.items[i].track;
	/* pads: by map, or in walking order */
	if (c.l->map) {
		for (size_t i = 0; i < c.count; i++)
			c.items[i].pad = to_canon(c.l->side,
						  r->build->pins[c.items[i].pin].centre)
						 .x;
		if (!(ok = check_planar(&c)))
			goto out;
	} else {
		size_t first = r->pin_first[index];
		if (!c.l->pin1_given)
			centre_row(&c, first);
		int64_t *xs = malloc((c.count ? c.count : 1) * sizeof(*xs));
		size_t *idx = malloc((c.count ? c.count : 1) * sizeof(*idx));
		if (!xs || !idx) {
			free(xs);
			free(idx);
			ok = gp_diag_oom(r->diag, NULL);
			goto out;
		}
		for (size_t k = 0; k < c.count; k++) {
			xs[k] = to_canon(c.l->side, r->build->pins[first + k].centre).x;
			idx[k] = first + k;
		}
		for (size_t k = 1; k < c.count; k++)
			for (size_t j = k; j > 0 && xs[j] < xs[j - 1]; j--) {
				int64_t t = xs[j];
				size_t u = idx[j];
				xs[j] = xs[j - 1], idx[j] = idx[j - 1];
				xs[j - 1] = t, idx[j - 1] = u;
			}
		for (size_t k = 0; k < c.count; k++) {
			c.items[k].pad = xs[k];
			c.items[k].pin = (int)idx[k];
			r->build->pins[idx[k]].net = c.items[k].net;
			r->nets[c.items[k].net].pin = (int)idx[k];
		}
		free(xs);
		free(idx);
	}
	int64_t y_gather = c.out.y0 - bottom_ext - r->space - maxw;
	int64_t y_pad = c.plate.y0 + c.l->edge_clearance + c.l->pad_length;
	int64_t y_pad_centre = c.plate.y0 + c.l->edge_clearance +
			       c.l->pad_length / 2;
	ok = fan_out(&c, y_gather, y_pad) && build_paths(&c, y_pad_centre);
out:
	free(c.items);
	return ok;
}

/* --- pins: which ledge carries which net --------------------------------------- */

static bool carried(const struct gp_ledge *l, const struct gp_net *net)
{
	return l->carries == GP_CARRIES_ALL ||
	       (l->carries == GP_CARRIES_COMMONS && net->kind == GP_NET_COMMON) ||
	       (l->carries == GP_CARRIES_SEGMENTS && net->kind == GP_NET_SEGMENT);
}

static void mark_range(int *rank, int first, long count, int value)
{
	for (long k = 0; k < count; k++)
		if (rank[first + k] < value)
			rank[first + k] = value;
}

/* rank[net] for a ledge with a 'carries' list: 3 named itself, 2 through
 * its element (a block, digit row or icon), 1 through its kind (the words
 * commons and segments), 0 not listed. */
static bool listed_nets(struct route *r, const struct gp_ledge *l, int *rank)
{
	const struct gp_design *d = r->design;
	const struct gp_build *b = r->build;
	bool ok = true;
	for (size_t k = 0; k < l->carries_list->count; k++) {
		const struct gp_node *item = l->carries_list->items[k];
		const char *name = item->text;
		bool commons = strcmp(name, "commons") == 0;
		if (commons || strcmp(name, "segments") == 0) {
			for (size_t i = 0; i < r->net_count; i++)
				if ((b->art.nets[i].kind == GP_NET_COMMON) ==
				    commons)
					mark_range(rank, (int)i, 1, 1);
			continue;
		}
		bool found = false;
		for (size_t i = 0; i < d->block_count; i++) {
			if (strcmp(d->blocks[i].name, name) != 0)
				continue;
			const struct gp_block_nets *n = &b->blocks[i];
			if (d->blocks[i].commons_from < 0)
				mark_range(rank, n->first_common,
					   n->common_count, 2);
			mark_range(rank, n->first_segment, n->segment_count, 2);
			found = true;
		}
		for (size_t i = 0; i < b->digit_row_count; i++) {
			if (strcmp(d->digits[i].name, name) != 0)
				continue;
			const struct gp_digit_row *row = &b->digit_rows[i];
			mark_range(rank, row->first_common, row->common_count, 2);
			mark_range(rank, row->first_segment, row->segment_count,
				   2);
			found = true;
		}
		for (size_t i = 0; i < d->icon_count; i++) {
			if (strcmp(d->icons[i].name, name) != 0)
				continue;
			for (size_t p = 0; p < b->art.pixel_count; p++) {
				const struct gp_pixel *px = &b->art.pixels[p];
				if (px->owner_kind != GP_OWNER_ICON ||
				    px->owner != (int)i)
					continue;
				mark_range(rank, px->common, 1, 2);
				mark_range(rank, px->segment, 1, 2);
			}
			found = true;
		}
		for (size_t i = 0; i < r->net_count; i++) {
			if (strcmp(b->art.nets[i].name, name) != 0)
				continue;
			rank[i] = 3;
			found = true;
		}
		if (!found)
			ok = gp_diag_error(r->diag, &item->where,
					   "'carries' of ledge '%s' names net "
					   "%s, which the glass does not have",
					   l->name, name);
	}
	return ok;
}

/* The ledge of every net without a pin map: the ledge whose 'carries'
 * list names it (itself before its element before its kind; of equals
 * the first), else the first ledge that carries its kind. */
static bool choose_ledges(struct route *r)
{
	const struct gp_routing *g = r->g;
	int *rank = calloc(r->net_count ? r->net_count : 1, sizeof(*rank));
	int *best = calloc(r->net_count ? r->net_count : 1, sizeof(*best));
	bool ok = rank && best;
	if (!ok) {
		free(rank);
		free(best);
		return gp_diag_oom(r->diag, NULL);
	}
	for (size_t li = 0; li < g->ledge_count; li++) {
		const struct gp_ledge *l = &r->ledges[li];
		if (l->map || l->carries != GP_CARRIES_LISTED)
			continue;
		memset(rank, 0, r->net_count * sizeof(*rank));
		ok &= listed_nets(r, l, rank);
		for (size_t i = 0; i < r->net_count; i++)
			if (rank[i] > best[i]) {
				best[i] = rank[i];
				r->nets[i].ledge = (int)li;
			}
	}
	for (size_t li = 0; li < g->ledge_count; li++) {
		const struct gp_ledge *l = &r->ledges[li];
		if (l->map || l->carries == GP_CARRIES_LISTED)
			continue;
		for (size_t i = 0; i < r->net_count; i++)
			if (r->nets[i].ledge < 0 &&
			    carried(l, &r->build->art.nets[i]))
				r->nets[i].ledge = (int)li;
	}
	free(rank);
	free(best);
	return ok;
}

/* Reads the explicit pin map: pins.LEDGE: [NET or NC, ...] in pin order. */
static bool read_map(struct route *r)
{
	const struct gp_node *pins = r->g->pins;
	const struct gp_routing *g = r->g;
	struct gp_ledge *ledges = r->ledges;
	const char *names[GP_MAX_LEDGES];
	for (size_t i = 0; i < g->ledge_count; i++)
		names[i] = ledges[i].name;
	bool ok = true;
	for (size_t k = 0; k < pins->count; k++) {
		const char *key = pins->keys[k]->text;
		size_t li = 0;
		while (li < g->ledge_count && strcmp(names[li], key) != 0)
			li++;
		if (li == g->ledge_count) {
			const char *near = gp_nearest_word(key, names, g->ledge_count);
			ok = gp_diag_error(r->diag, &pins->keys[k]->where,
					   "'pins' names ledge '%s', which is "
					   "not in 'ledges'%s%s%s",
					   key, near ? "; did you mean '" : "",
					   near ? near : "", near ? "'?" : "");
			continue;
		}
		if (!gp_node_expect_sequence(pins->items[k], 0, r->diag)) {
			ok = false;
			continue;
		}
		ledges[li].map = pins->items[k];
	}
	if (ok)
		for (size_t i = 0; i < g->ledge_count; i++)
			if (!ledges[i].map)
				ok = gp_diag_error(r->diag, &pins->where,
						   "'pins' gives no map for "
						   "ledge '%s'; with a pin map "
						   "every ledge needs one",
						   ledges[i].name);
	return ok;
}

static int next_first_pin(const struct route *r, const struct gp_ledge *l)
{
	if (l->first_pin)
		return (int)l->first_pin;
	int last = 0;
	for (size_t i = 0; i < r->build->pin_count; i++)
		if (r->build->pins[i].number > last)
			last = r->build->pins[i].number;
	return last + 1;
}

bool gp_route_assign_nets(struct route *r)
{
	const struct gp_routing *g = r->g;
	size_t total = 0;
	bool ok = true;
	if (g->pins && !read_map(r))
		return false;
	for (size_t i = 0; i < g->ledge_count; i++)
		total += r->ledges[i].map ? r->ledges[i].map->count : r->net_count;
	r->build->pins = calloc(total ? total : 1, sizeof(*r->build->pins));
	if (!r->build->pins)
		return gp_diag_oom(r->diag, NULL);
	for (size_t i = 0; i < r->net_count; i++)
		r->nets[i].ledge = -1, r->nets[i].pin = -1;
	bool any_map = false;
	for (size_t li = 0; li < g->ledge_count; li++)
		any_map |= r->ledges[li].map != NULL;
	if (!any_map && !choose_ledges(r))
		return false;
	for (size_t li = 0; li < g->ledge_count; li++) {
		struct gp_ledge *l = &r->ledges[li];
		size_t first = r->build->pin_count;
		r->pin_first[li] = first;
		if (l->map) {
			if (!make_pads(r, l, (int)li, l->map->count,
				       next_first_pin(r, l)))
				return false;
			for (size_t k = 0; k < l->map->count; k++) {
				const struct gp_node *item = l->map->items[k];
				if (!gp_node_expect_scalar(item, r->diag)) {
					ok = false;
					continue;
				}
				if (strcmp(item->text, "NC") == 0)
					continue;
				int net = find_net(r, item->text);
				if (net < 0) {
					ok = gp_diag_error(r->diag, &item->where,
							   "pin map names net "
							   "'%s', which the "
							   "glass does not have",
							   item->text);
					continue;
				}
				if (r->nets[net].ledge >= 0) {
					ok = gp_diag_error(r->diag, &item->where,
							   "pin map gives net "
							   "%s a second pin",
							   item->text);
					continue;
				}
				r->nets[net].ledge = (int)li;
				r->nets[net].pin = (int)(first + k);
				r->nets[net].has_pad = true;
				r->build->pins[first + k].net = net;
			}
			continue;
		}
		size_t count = 0;
		for (size_t i = 0; i < r->net_count; i++)
			count += r->nets[i].ledge == (int)li;
		if (count && !make_pads(r, l, (int)li, count,
					next_first_pin(r, l)))
			return false;
	}
	for (size_t i = 0; ok && i < r->net_count; i++)
		if (r->nets[i].ledge < 0)
			ok = gp_diag_error(r->diag, g->pins ? &g->pins->where
							    : &r->ledges[0].where,
					   "net %s has no pin: %s",
					   net_name(r, (int)i),
					   g->pins ? "add it to the pin map"
						   : "no ledge 'carries' it; "
						     "name it (or its element) "
						     "in a ledge's 'carries' "
						     "or give a ledge "
						     "'carries: all'");
	return ok;
}
