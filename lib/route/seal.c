/* The seal band with its fill port, the cut outlines, the alignment marks
 * and the part-number text. */
#include "route.h"

#include "stage.h"
#include "font.h"
#include "geos.h"
#include "units.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Width of the line that draws a cut outline: a drawing convention of
 * ours; the cut is along the line's centre. */
#define OUTLINE_LINE_WIDTH (100 * 1000)

static const char *mm(char *buf, int64_t nm)
{
	gp_format_mm_short(buf, 32, nm);
	return buf;
}

void gp_seal_boxes(const struct gp_design *design, struct gp_box *inner,
		   struct gp_box *outer)
{
	const struct gp_seal_spec *s = &design->routing->seal;
	*inner = gp_box_grow(design->viewing, s->distance);
	*outer = gp_box_grow(*inner, s->width);
}

static bool add_outline(struct gp_build *build, enum gp_layer layer,
			struct gp_box box)
{
	struct gp_shape *shape = gp_artwork_add_box(&build->art, layer,
						    GP_ROLE_OUTLINE,
						    GP_NET_NONE, box);
	if (!shape)
		return false;
	shape->line_width = OUTLINE_LINE_WIDTH;
	return true;
}

bool gp_outlines_layout(struct gp_build *build, struct gp_diag *diag)
{
	if (!add_outline(build, GP_LAYER_FRONT_OUTLINE,
			 build->design->front.box) ||
	    !add_outline(build, GP_LAYER_BACK_OUTLINE,
			 build->design->back.box))
		return gp_diag_oom(diag, NULL);
	return true;
}

void gp_seal_port_span(const struct gp_design *d, int64_t *a, int64_t *b,
		       int64_t *lo, int64_t *hi)
{
	const struct gp_seal_spec *s = &d->routing->seal;
	struct gp_box in, out;
	gp_seal_boxes(d, &in, &out);
	bool across = s->port_side == GP_SIDE_BOTTOM ||
		      s->port_side == GP_SIDE_TOP;
	*lo = across ? in.x0 : in.y0;
	*hi = across ? in.x1 : in.y1;
	int64_t c = s->port_position_given ? s->port_position
					   : (*lo + *hi) / 2;
	*a = c - s->port_width / 2;
	*b = *a + s->port_width;
}

/* The fill port: a gap through the band on its side. */
static bool port_box(const struct gp_design *d, struct gp_box in,
		     struct gp_box out, struct gp_box *port,
		     struct gp_diag *diag)
{
	const struct gp_seal_spec *s = &d->routing->seal;
	int64_t a, b, lo, hi;
	gp_seal_port_span(d, &a, &b, &lo, &hi);
	if (a < lo || b > hi) {
		char x[32], y[32], z[32], w[32];
		return gp_diag_error(diag, &s->port_where,
				     "the fill port (%s to %s mm) must lie "
				     "along the %s side of the seal, which "
				     "runs from %s to %s mm inside",
				     mm(x, a), mm(y, b),
				     gp_side_name(s->port_side), mm(z, lo),
				     mm(w, hi));
	}
	switch (s->port_side) {
	case GP_SIDE_BOTTOM: *port = gp_box_make(a, out.y0, b, in.y0); break;
	case GP_SIDE_TOP: *port = gp_box_make(a, in.y1, b, out.y1); break;
	case GP_SIDE_LEFT: *port = gp_box_make(out.x0, a, in.x0, b); break;
	default: *port = gp_box_make(in.x1, a, out.x1, b); break;
	}
	return true;
}

static bool add_seal(struct gp_build *build, struct gp_box in,
		     struct gp_box out, struct gp_geos *geos,
		     struct gp_diag *diag)
{
	const struct gp_design *d = build->design;
	struct gp_box port;
	if (!port_box(d, in, out, &port, diag))
		return false;
	for (size_t i = 0; i < build->art.shape_count; i++) {
		const struct gp_shape *s = &build->art.shapes[i];
		if (s->layer == GP_LAYER_TRANSFER &&
		    gp_box_overlap(gp_polygon_bounds(&s->poly), port))
			return gp_diag_error(diag, &d->routing->seal.port_where,
					     "the fill port lies over the "
					     "transfer dots of %s; move the "
					     "port",
					     build->art.nets[s->net].name);
	}
	struct gp_polyset band, hole, result;
	gp_polyset_init(&band);
	gp_polyset_init(&hole);
	gp_polyset_init(&result);
	struct gp_polygon p;
	gp_polygon_init(&p);
	bool ok = gp_polygon_set_box(&p, out) && gp_polyset_take(&band, &p);
	ok = ok && gp_polygon_set_box(&p, in) && gp_polyset_take(&hole, &p);
	ok = ok && gp_polygon_set_box(&p, port) && gp_polyset_take(&hole, &p);
	ok = ok && gp_geos_difference(geos, &band, &hole, &result);
	for (size_t i = 0; ok && i < result.count; i++)
		ok = gp_artwork_add_shape(&build->art, GP_LAYER_SEAL,
					  GP_ROLE_SEAL, GP_NET_NONE,
					  &result.items[i]) != NULL;
	gp_polygon_finish(&p);
	gp_polyset_finish(&band);
	gp_polyset_finish(&hole);
	gp_polyset_finish(&result);
	return ok || gp_diag_error(diag, NULL, "cannot draw the seal");
}

/* --- alignment marks ------------------------------------------------------- */

/* Front: a cross.  Back: four squares round it, leaving a cross-shaped
 * gap `gap` wider than the bars on each side, so the front cross sits
 * inside its partner when the plates are aligned. */
static bool add_mark(struct gp_build *build, struct gp_point c,
		     const struct gp_marks_spec *m)
{
	int64_t h = m->size / 2, t0 = m->line / 2, t1 = m->line - t0;
	int64_t in = t1 + m->gap;
	struct gp_artwork *art = &build->art;
	bool ok = gp_artwork_add_box(art, GP_LAYER_FRONT_ITO, GP_ROLE_MARK,
				     GP_NET_NONE,
				     gp_box_make(c.x - h, c.y - t0, c.x + h,
						 c.y + t1)) &&
		  gp_artwork_add_box(art, GP_LAYER_FRONT_ITO, GP_ROLE_MARK,
				     GP_NET_NONE,
				     gp_box_make(c.x - t0, c.y - h, c.x - t0 + m->line,
						 c.y - t0)) &&
		  gp_artwork_add_box(art, GP_LAYER_FRONT_ITO, GP_ROLE_MARK,
				     GP_NET_NONE,
				     gp_box_make(c.x - t0, c.y + t1, c.x - t0 + m->line,
						 c.y + h));
	for (int q = 0; ok && q < 4; q++) {
		int64_t sx = q & 1 ? 1 : -1, sy = q & 2 ? 1 : -1;
		int64_t ax = c.x + sx * in, bx = c.x + sx * h;
		int64_t ay = c.y + sy * in, by = c.y + sy * h;
		ok = gp_artwork_add_box(art, GP_LAYER_BACK_ITO, GP_ROLE_MARK,
					GP_NET_NONE,
					gp_box_make(ax < bx ? ax : bx,
						    ay < by ? ay : by,
						    ax < bx ? bx : ax,
						    ay < by ? by : ay)) != NULL;
	}
	return ok;
}

/* Nothing of another shape within min_space of the mark's square, and
 * the square outside the seal, inside both plates. */
static bool check_mark(const struct gp_build *build, struct gp_box sq,
		       struct gp_box out, const struct gp_marks_spec *m,
		       struct gp_diag *diag)
{
	const struct gp_design *d = build->design;
	char x[32], y[32];
	struct gp_point c = { (sq.x0 + sq.x1) / 2, (sq.y0 + sq.y1) / 2 };
	struct gp_box f = d->front.box, b = d->back.box;
	int64_t e = d->rules.edge_clearance;
	struct gp_box both = gp_box_make(
		(f.x0 > b.x0 ? f.x0 : b.x0) + e, (f.y0 > b.y0 ? f.y0 : b.y0) + e,
		(f.x1 < b.x1 ? f.x1 : b.x1) - e, (f.y1 < b.y1 ? f.y1 : b.y1) - e);
	if (sq.x0 < both.x0 || sq.y0 < both.y0 || sq.x1 > both.x1 ||
	    sq.y1 > both.y1 || gp_box_overlap(gp_box_grow(sq, d->rules.min_space), out))
		return gp_diag_error(diag, &m->where,
				     "the alignment mark at (%s, %s) mm must "
				     "lie outside the seal where both plates "
				     "are, clear of their edges",
				     mm(x, c.x), mm(y, c.y));
	struct gp_box near = gp_box_grow(sq, d->rules.min_space);
	for (size_t i = 0; i < build->art.shape_count; i++) {
		const struct gp_shape *s = &build->art.shapes[i];
		if (s->role == GP_ROLE_MARK || s->role == GP_ROLE_OUTLINE ||
		    s->layer == GP_LAYER_SEAL || s->layer == GP_LAYER_TRANSFER)
			continue;
		if (gp_box_overlap(gp_polygon_bounds(&s->poly), near))
			return gp_diag_error(
				diag, &m->where,
				"the alignment mark at (%s, %s) mm comes "
				"within the minimum space of %s; place the "
				"marks with 'at'",
				mm(x, c.x), mm(y, c.y),
				s->net >= 0 ? build->art.nets[s->net].name
					    : gp_role_name(s->role));
	}
	return true;
}

static bool add_marks(struct gp_build *build, struct gp_box out,
		      struct gp_diag *diag)
{
	const struct gp_design *d = build->design;
	const struct gp_marks_spec *m = &d->routing->marks;
	if (!m->enabled)
		return true;
	struct gp_point at[GP_MAX_MARKS];
	size_t count = m->count;
	memcpy(at, m->at, sizeof(at));
	if (count == 0) {
		/* two corners of the plates' overlap, away from the first
		 * ledge (or at the top) */
		struct gp_box f = d->front.box, b = d->back.box;
		int64_t e = d->rules.edge_clearance + m->size / 2;
		struct gp_box both = gp_box_make(
			(f.x0 > b.x0 ? f.x0 : b.x0) + e,
			(f.y0 > b.y0 ? f.y0 : b.y0) + e,
			(f.x1 < b.x1 ? f.x1 : b.x1) - e,
			(f.y1 < b.y1 ? f.y1 : b.y1) - e);
		enum gp_side far = d->routing->ledge_count
					   ? (d->routing->ledges[0].side + 2) % 4
					   : GP_SIDE_TOP;
		switch (far) {
		case GP_SIDE_BOTTOM:
			at[0] = (struct gp_point){ both.x0, both.y0 };
			at[1] = (struct gp_point){ both.x1, both.y0 };
			break;
		case GP_SIDE_LEFT:
			at[0] = (struct gp_point){ both.x0, both.y0 };
			at[1] = (struct gp_point){ both.x0, both.y1 };
			break;
		case GP_SIDE_RIGHT:
			at[0] = (struct gp_point){ both.x1, both.y0 };
			at[1] = (struct gp_point){ both.x1, both.y1 };
			break;
		default:
			at[0] = (struct gp_point){ both.x0, both.y1 };
			at[1] = (struct gp_point){ both.x1, both.y1 };
			break;
		}
		count = 2;
	}
	int64_t h = m->size / 2;
	for (size_t i = 0; i < count; i++)
		if (!check_mark(build,
				gp_box_make(at[i].x - h, at[i].y - h,
					    at[i].x + h, at[i].y + h),
				out, m, diag))
			return false;
	for (size_t i = 0; i < count; i++)
		if (!add_mark(build, at[i], m))
			return gp_diag_oom(diag, NULL);
	return true;
}

/* --- part number text -------------------------------------------------------- */

static bool add_text(struct gp_build *build, struct gp_box out,
		     struct gp_geos *geos, struct gp_diag *diag)
{
	const struct gp_design *d = build->design;
	const struct gp_text_spec *t = &d->routing->text;
	if (!t->given)
		return true;
	char label[256];
	if (t->text)
		snprintf(label, sizeof(label), "%s", t->text);
	else
		snprintf(label, sizeof(label), "%s REV %s", d->part,
			 d->revision);
	struct gp_font *font = gp_font_open(t->font, NULL, &t->where, diag);
	if (!font)
		return false;
	struct gp_text_style style;
	gp_text_style_init(&style);
	style.cap_height = t->height;
	style.align = GP_TEXT_CENTRE;
	style.base = GP_TEXT_MIDDLE;
	style.rotation = t->rotation;
	style.mirror = t->mirror;
	style.chord_tolerance = d->rules.chord_tolerance;
	struct gp_text text;
	struct gp_polyset polys;
	gp_polyset_init(&polys);
	bool ok = gp_font_set_text(font, label, &style, t->position, &text,
				   &t->where, diag);
	gp_font_destroy(font);
	if (!ok)
		return false;
	char a[32], b[32];
	struct gp_box bb = text.bounds;
	enum gp_layer layer = gp_plate_ito_layer(t->plate);
	struct gp_box plate = t->plate == GP_PLATE_FRONT ? d->front.box
							 : d->back.box;
	struct gp_box near = gp_box_grow(bb, d->rules.min_space);
	if (gp_box_overlap(near, out) || bb.x0 < plate.x0 + d->rules.edge_clearance ||
	    bb.y0 < plate.y0 + d->rules.edge_clearance ||
	    bb.x1 > plate.x1 - d->rules.edge_clearance ||
	    bb.y1 > plate.y1 - d->rules.edge_clearance) {
		ok = gp_diag_error(diag, &t->where,
				   "the part text at (%s, %s) mm must lie on "
				   "its plate outside the seal, clear of the "
				   "edges",
				   mm(a, t->position.x), mm(b, t->position.y));
		goto out;
	}
	for (size_t i = 0; ok && i < build->art.shape_count; i++) {
		const struct gp_shape *s = &build->art.shapes[i];
		if (s->layer == layer && s->role != GP_ROLE_OUTLINE &&
		    gp_box_overlap(gp_polygon_bounds(&s->poly), near))
			ok = gp_diag_error(diag, &t->where,
					   "the part text at (%s, %s) mm comes "
					   "within the minimum space of %s",
					   mm(a, t->position.x),
					   mm(b, t->position.y),
					   s->net >= 0
						   ? build->art.nets[s->net].name
						   : gp_role_name(s->role));
	}
	ok = ok && gp_text_polygons(geos, &text, &polys);
	for (size_t i = 0; ok && i < polys.count; i++)
		ok = gp_artwork_add_shape(&build->art, layer, GP_ROLE_TEXT,
					  GP_NET_NONE, &polys.items[i]) != NULL;
	if (ok)
		gp_buffer_printf(&build->notes, "part text: \"%s\" on the %s "
				 "plate\n", label,
				 t->plate == GP_PLATE_FRONT ? "front" : "back");
out:
	gp_text_finish(&text);
	gp_polyset_finish(&polys);
	return ok;
}

bool gp_seal_layout(struct gp_build *build, const struct gp_box *in,
		    const struct gp_box *out, struct gp_geos *geos,
		    struct gp_diag *diag)
{
	if (!build->design->routing->seal.given)
		return true;
	return add_seal(build, *in, *out, geos, diag) &&
	       add_marks(build, *out, diag) && add_text(build, *out, geos, diag);
}
