/* Where a view's dimensions go: tiers and the side of the text chosen so
 * that no text overlaps another text or a dimension line, and no dimension
 * line runs through a text.  Extension lines are drawn broken where they
 * would cross a text (ISO 129-1: values are not crossed by any line, from
 * memory).  The search always ends: a tier beyond everything placed is
 * empty.
 *
 * A view is placed in its own frame (the glass at the view's scale with
 * ox = oy = 0), so the room it needs is known before the sheet is laid
 * out, and drawing translates it unchanged. */
#include "proof-internal.h"

#include "array.h"
#include "units.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define ARROW 2.5           /* arrowhead length, mm */
#define ARROW_HALF 0.45     /* half its width */
#define EXT_GAP 1.0         /* feature to the start of an extension line */
#define EXT_PAST 1.5        /* extension line past the dimension line */
#define TEXT_GAP 0.5        /* dimension line to the text's box */
#define TEXT_PAD 0.4        /* kept clear round a text */
#define STRICT_TIERS 2      /* tiers tried beyond the last used, strictly */

static bool overlap(struct proof_rect a, struct proof_rect b)
{
	return a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1;
}

static struct proof_rect grow(struct proof_rect r, double d)
{
	return (struct proof_rect){ r.x0 - d, r.y0 - d, r.x1 + d, r.y1 + d };
}

static bool push_rect(struct proof_rect **items, size_t *count,
		      size_t *capacity, struct proof_rect r)
{
	if (!gp_array_reserve(*items, *capacity, *count + 1))
		return false;
	(*items)[(*count)++] = r;
	return true;
}

void proof_space_init(struct proof_space *s)
{
	memset(s, 0, sizeof(*s));
}

void proof_space_finish(struct proof_space *s)
{
	free(s->texts);
	free(s->lines);
	free(s->exts);
	memset(s, 0, sizeof(*s));
}

void proof_space_add_text(struct proof_space *s, struct proof_rect r)
{
	if (!push_rect(&s->texts, &s->text_count, &s->text_capacity, r))
		s->failed = true;
}

static void add_line(struct proof_space *s, struct proof_rect r)
{
	if (!push_rect(&s->lines, &s->line_count, &s->line_capacity, r))
		s->failed = true;
}

static void add_ext(struct proof_space *s, struct proof_rect r)
{
	if (!push_rect(&s->exts, &s->ext_count, &s->ext_capacity, r))
		s->failed = true;
}

static bool hits(const struct proof_rect *items, size_t count,
		 struct proof_rect r)
{
	for (size_t i = 0; i < count; i++)
		if (overlap(items[i], r))
			return true;
	return false;
}

/* --- the (r, v) frame of a side ---------------------------------------------- */

/* r runs along the dimension line (glass mm times the scale; paper x for
 * horizontal dimensions, minus paper y for vertical ones), v outwards
 * from the glass edge.  dir is where the text lies from its line in v. */
static int text_dir(enum proof_side side)
{
	return side == SIDE_TOP || side == SIDE_LEFT ? 1 : -1;
}

static struct proof_rect to_paper(const struct proof_frame *f,
				  enum proof_side side, double r0, double r1,
				  double v0, double v1)
{
	if (r0 > r1) {
		double t = r0;
		r0 = r1;
		r1 = t;
	}
	if (v0 > v1) {
		double t = v0;
		v0 = v1;
		v1 = t;
	}
	switch (side) {
	case SIDE_TOP:
		return (struct proof_rect){ r0, f->y0 - v1, r1, f->y0 - v0 };
	case SIDE_BOTTOM:
		return (struct proof_rect){ r0, f->y1 + v0, r1, f->y1 + v1 };
	case SIDE_LEFT:
		return (struct proof_rect){ f->x0 - v1, -r1, f->x0 - v0, -r0 };
	default:
		return (struct proof_rect){ f->x1 + v0, -r1, f->x1 + v1, -r0 };
	}
}

void proof_rv_point(const struct proof_frame *f, enum proof_side side,
		    double r, double v, double *x, double *y)
{
	struct proof_rect p = to_paper(f, side, r, r, v, v);
	*x = p.x0;
	*y = p.y0;
}

/* v of a feature at glass coordinate c (y for top and bottom, x else). */
static double feature_v(const struct proof_frame *f, enum proof_side side,
			int64_t c)
{
	double s = f->scale;
	switch (side) {
	case SIDE_TOP:
		return s * gp_mm(c - f->glass.y1);
	case SIDE_BOTTOM:
		return s * gp_mm(f->glass.y0 - c);
	case SIDE_LEFT:
		return s * gp_mm(f->glass.x0 - c);
	default:
		return s * gp_mm(c - f->glass.x1);
	}
}

void proof_frame_init(struct proof_frame *f, struct gp_box glass,
		      double scale)
{
	f->glass = glass;
	f->scale = scale;
	f->x0 = scale * gp_mm(glass.x0);
	f->x1 = scale * gp_mm(glass.x1);
	f->y0 = -scale * gp_mm(glass.y1);
	f->y1 = -scale * gp_mm(glass.y0);
}

/* --- placing one dimension ---------------------------------------------------- */

struct candidate {
	double vl;                /* the line */
	double r0, w;             /* text along r */
	double l0, l1;            /* the drawn line along r */
	bool inside;              /* arrows inside the extension lines */
	struct proof_rect text, line, ext[2];
};

static void make_candidate(const struct proof_frame *f,
			   const struct proof_dim *d, int tier, int where,
			   double w, double em, struct candidate *c)
{
	double ra = f->scale * gp_mm(d->a), rb = f->scale * gp_mm(d->b);
	c->vl = PROOF_FIRST_TIER + PROOF_TIER * tier;
	c->inside = rb - ra >= 2.5 * ARROW;
	c->w = w;
	double stub = c->inside ? 0 : 2 * ARROW;
	double gap = c->inside ? 1.0 : 2 * ARROW + 1.0;
	if (where == 0)
		c->r0 = (ra + rb - w) / 2;
	else if (where == 1)
		c->r0 = rb + gap;
	else
		c->r0 = ra - gap - w;
	c->l0 = ra - stub;
	c->l1 = rb + stub;
	if (where == 1 && c->r0 + w > c->l1)
		c->l1 = c->r0 + w;
	if (where == 2 && c->r0 < c->l0)
		c->l0 = c->r0;
	int dir = text_dir(d->side);
	double t0 = c->vl + dir * TEXT_GAP;
	double t1 = c->vl + dir * (TEXT_GAP + PROOF_BOX * em);
	c->text = to_paper(f, d->side, c->r0, c->r0 + w, t0, t1);
	c->line = to_paper(f, d->side, c->l0, c->l1, c->vl - ARROW_HALF,
			   c->vl + ARROW_HALF);
	double fa = d->has_feature_a ? feature_v(f, d->side, d->feature_a) : 0;
	double fb = d->has_feature_b ? feature_v(f, d->side, d->feature_b) : 0;
	c->ext[0] = to_paper(f, d->side, ra, ra, fa + EXT_GAP,
			     c->vl + EXT_PAST);
	c->ext[1] = to_paper(f, d->side, rb, rb, fb + EXT_GAP,
			     c->vl + EXT_PAST);
}

/* Another dimension on the same line overlapping this one's span would
 * read as one; chained ones may touch. */
static bool shares_line(const struct proof_dim *dims, size_t count,
			const struct proof_dim *d, int tier)
{
	for (size_t i = 0; i < count; i++) {
		const struct proof_dim *o = &dims[i];
		if (o == d || !o->placed || o->side != d->side ||
		    o->tier != tier)
			continue;
		if (o->a < d->b && d->a < o->b)
			return true;
	}
	return false;
}

static bool fits(const struct proof_space *s, const struct proof_dim *dims,
		 size_t count, const struct proof_dim *d, int tier,
		 const struct candidate *c, bool strict)
{
	struct proof_rect text = grow(c->text, TEXT_PAD);
	if (hits(s->texts, s->text_count, text) ||
	    hits(s->lines, s->line_count, text) ||
	    hits(s->texts, s->text_count, c->line) ||
	    shares_line(dims, count, d, tier))
		return false;
	if (!strict)
		return true;
	return !hits(s->exts, s->ext_count, text) &&
	       !hits(s->texts, s->text_count, c->ext[0]) &&
	       !hits(s->texts, s->text_count, c->ext[1]);
}

static bool try_tier(struct proof_space *s, const struct proof_frame *f,
		     struct proof_dim *dims, size_t count, struct proof_dim *d,
		     int tier, double w, double em, bool strict)
{
	double span = f->scale * gp_mm(d->b - d->a);
	for (int where = 0; where < 3; where++) {
		if (where == 0 && (w + 2 > span || span < 2.5 * ARROW))
			continue;
		struct candidate c;
		make_candidate(f, d, tier, where, w, em, &c);
		if (!fits(s, dims, count, d, tier, &c, strict))
			continue;
		d->placed = true;
		d->tier = tier;
		d->where = where;
		d->text_width = w;
		proof_space_add_text(s, c.text);
		add_line(s, c.line);
		add_ext(s, c.ext[0]);
		add_ext(s, c.ext[1]);
		return true;
	}
	return false;
}

static void place_one(struct proof_space *s, const struct proof_frame *f,
		      struct proof_dim *dims, size_t count,
		      struct proof_dim *d, double w, double em, int *used)
{
	int limit = used[d->side] + STRICT_TIERS;
	for (int tier = 0; tier <= limit; tier++)
		if (try_tier(s, f, dims, count, d, tier, w, em, true))
			goto placed;
	for (int tier = 0;; tier++)
		if (try_tier(s, f, dims, count, d, tier, w, em, false))
			goto placed;
placed:
	if (d->tier + 1 > used[d->side])
		used[d->side] = d->tier + 1;
}

void proof_place_dims(struct proof *p, struct proof_space *s,
		      const struct proof_frame *f, struct proof_dim *dims,
		      size_t count)
{
	int used[SIDE_COUNT] = { 0 };
	proof_letter(p, PROOF_LETTER, false);
	double em = proof_em(PROOF_LETTER, false);
	/* in the order given within each order class: what comes first sits
	 * nearest the glass */
	int top = 0;
	for (size_t i = 0; i < count; i++)
		if (dims[i].order > top)
			top = dims[i].order;
	for (int order = 0; order <= top; order++)
		for (size_t i = 0; i < count; i++) {
			struct proof_dim *d = &dims[i];
			if (d->order != order || d->a >= d->b)
				continue;
			char full[160];
			snprintf(full, sizeof(full), "%s%s", d->label,
				 d->value);
			double w = proof_text_width(p, full);
			place_one(s, f, dims, count, d, w, em, used);
		}
}

void proof_space_room(const struct proof_space *s,
		      const struct proof_frame *f, double room[SIDE_COUNT])
{
	for (int i = 0; i < SIDE_COUNT; i++)
		room[i] = 0;
	const struct proof_rect *lists[3] = { s->texts, s->lines, s->exts };
	size_t counts[3] = { s->text_count, s->line_count, s->ext_count };
	for (int k = 0; k < 3; k++)
		for (size_t i = 0; i < counts[k]; i++) {
			struct proof_rect r = lists[k][i];
			if (f->y0 - r.y0 > room[SIDE_TOP])
				room[SIDE_TOP] = f->y0 - r.y0;
			if (r.y1 - f->y1 > room[SIDE_BOTTOM])
				room[SIDE_BOTTOM] = r.y1 - f->y1;
			if (f->x0 - r.x0 > room[SIDE_LEFT])
				room[SIDE_LEFT] = f->x0 - r.x0;
			if (r.x1 - f->x1 > room[SIDE_RIGHT])
				room[SIDE_RIGHT] = r.x1 - f->x1;
		}
	for (int i = 0; i < SIDE_COUNT; i++)
		room[i] += 2;
}

/* --- drawing ---------------------------------------------------------------- */

static void arrowhead(struct proof *p, double x, double y, double dx,
		      double dy)
{
	/* tip at (x, y), pointing along (dx, dy) (unit) */
	cairo_move_to(p->cr, x, y);
	cairo_line_to(p->cr, x - dx * ARROW - dy * ARROW_HALF,
		      y - dy * ARROW + dx * ARROW_HALF);
	cairo_line_to(p->cr, x - dx * ARROW + dy * ARROW_HALF,
		      y - dy * ARROW - dx * ARROW_HALF);
	cairo_close_path(p->cr);
	cairo_fill(p->cr);
}

static int compare_doubles(const void *a, const void *b)
{
	double x = *(const double *)a, y = *(const double *)b;
	return x < y ? -1 : x > y;
}

/* An axis-aligned line from (x0, y0) to (x1, y1), left out where it
 * would cross a text of the space. */
static void broken_line(struct proof *p, const struct proof_space *s,
			double x0, double y0, double x1, double y1,
			double width)
{
	bool vertical = fabs(x1 - x0) < fabs(y1 - y0);
	double a = vertical ? fmin(y0, y1) : fmin(x0, x1);
	double b = vertical ? fmax(y0, y1) : fmax(x0, x1);
	double across = vertical ? x0 : y0;
	size_t n = 0;
	double *cuts = malloc((2 * s->text_count + 2) * sizeof(*cuts));
	if (!cuts)
		return;
	for (size_t i = 0; i < s->text_count; i++) {
		struct proof_rect t = grow(s->texts[i], 0.3);
		double lo = vertical ? t.y0 : t.x0, hi = vertical ? t.y1 : t.x1;
		double c0 = vertical ? t.x0 : t.y0, c1 = vertical ? t.x1 : t.y1;
		if (across <= c0 || across >= c1 || hi <= a || lo >= b)
			continue;
		cuts[n++] = lo;
		cuts[n++] = hi;
	}
	/* pieces: [a, b] minus the union of the cut intervals */
	double *starts = cuts, at = a;
	size_t pairs = n / 2;
	/* sort the intervals by their start */
	double (*iv)[2] = (double (*)[2])starts;
	qsort(iv, pairs, sizeof(*iv), compare_doubles);
	cairo_set_line_width(p->cr, width);
	for (size_t i = 0; i <= pairs; i++) {
		double end = i < pairs ? iv[i][0] : b;
		if (end > at + 0.05) {
			if (vertical) {
				cairo_move_to(p->cr, across, at);
				cairo_line_to(p->cr, across, fmin(end, b));
			} else {
				cairo_move_to(p->cr, at, across);
				cairo_line_to(p->cr, fmin(end, b), across);
			}
		}
		if (i < pairs && iv[i][1] > at)
			at = iv[i][1];
	}
	cairo_stroke(p->cr);
	free(cuts);
}

static void draw_text(struct proof *p, const struct proof_frame *f,
		      const struct proof_dim *d, const struct candidate *c,
		      double em)
{
	char full[160];
	snprintf(full, sizeof(full), "%s%s", d->label, d->value);
	int dir = text_dir(d->side);
	double vb = c->vl + dir * TEXT_GAP + (dir > 0 ? PROOF_DESCENT * em
						      : -PROOF_ASCENT * em);
	/* the baseline: for dir > 0 the box grows away from the line, the
	 * baseline one descent from its near edge; else one ascent from its
	 * far edge, which is nearer the line */
	if (dir < 0)
		vb = c->vl - TEXT_GAP - PROOF_DESCENT * em;
	else
		vb = c->vl + TEXT_GAP + PROOF_DESCENT * em;
	double x, y;
	proof_rv_point(f, d->side, c->r0, vb, &x, &y);
	cairo_save(p->cr);
	cairo_translate(p->cr, x, y);
	if (d->side == SIDE_LEFT || d->side == SIDE_RIGHT)
		cairo_rotate(p->cr, -1.57079632679489661923);
	cairo_move_to(p->cr, 0, 0);
	cairo_show_text(p->cr, full);
	cairo_new_path(p->cr);
	cairo_restore(p->cr);
}

void proof_draw_dims(struct proof *p, const struct proof_space *s,
		     const struct proof_frame *f,
		     const struct proof_dim *dims, size_t count)
{
	proof_letter(p, PROOF_LETTER, false);
	double em = proof_em(PROOF_LETTER, false);
	proof_set_colour(p, proof_dim_colour, 1.0);
	for (size_t i = 0; i < count; i++) {
		const struct proof_dim *d = &dims[i];
		if (!d->placed)
			continue;
		struct candidate c;
		make_candidate(f, d, d->tier, d->where, d->text_width, em, &c);
		for (int k = 0; k < 2; k++)
			broken_line(p, s, c.ext[k].x0, c.ext[k].y0, c.ext[k].x1,
				    c.ext[k].y1, 0.13);
		double ax, ay, bx, by;
		proof_rv_point(f, d->side, c.l0, c.vl, &ax, &ay);
		proof_rv_point(f, d->side, c.l1, c.vl, &bx, &by);
		proof_line(p, ax, ay, bx, by, 0.18);
		double ra = f->scale * gp_mm(d->a), rb = f->scale * gp_mm(d->b);
		double x0, y0, x1, y1;
		proof_rv_point(f, d->side, ra, c.vl, &x0, &y0);
		proof_rv_point(f, d->side, rb, c.vl, &x1, &y1);
		double len = hypot(x1 - x0, y1 - y0);
		double ux = (x1 - x0) / len, uy = (y1 - y0) / len;
		if (c.inside) {
			arrowhead(p, x0, y0, -ux, -uy);
			arrowhead(p, x1, y1, ux, uy);
		} else {
			arrowhead(p, x0, y0, ux, uy);
			arrowhead(p, x1, y1, -ux, -uy);
		}
		draw_text(p, f, d, &c, em);
	}
}

/* --- formatting ------------------------------------------------------------- */

void proof_dim_mm(char *buffer, size_t size, int64_t nm)
{
	/* exact when the value has at most four decimals (as a description
	 * writes it), else to the micrometre (three decimals) */
	if (nm % 100 != 0) {
		int64_t um = nm >= 0 ? (nm + 500) / 1000 : -((-nm + 500) / 1000);
		nm = um * 1000;
	}
	gp_format_mm_short(buffer, size, nm);
}
