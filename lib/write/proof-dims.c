/* Dimensions: the overview's dimension lines, the 100 mm ruler, and the
 * detail views with their own dimensions.
 *
 * Drawing conventions (ISO 129-1, from memory): extension lines start a
 * little off the feature and run a little past the dimension line; values
 * in millimetres without the unit; a value in parentheses is a reference
 * value and carries no tolerance.  The span of a row of cells or pads is
 * the toleranced dimension (the datum the layout keeps exact); the pitch
 * is given as a reference. */
#include "proof-internal.h"

#include "route.h"
#include "units.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Default tolerances: common practice, no published source.  The pattern
 * is photolithographic (its spans hold a few hundredths of a millimetre);
 * the plates are scribed and broken (a few tenths). */
#define DEFAULT_SPAN_TOLERANCE (20 * 1000)       /* +-0.02 mm */
#define DEFAULT_OUTLINE_TOLERANCE (200 * 1000)   /* +-0.2 mm */

#define MAX_DIM_BLOCKS 3    /* blocks dimensioned on the overview */
#define MAX_PAD_ROWS GP_MAX_LEDGES

#define MAX_DIMS 160

struct dim_list {
	struct proof_dim items[MAX_DIMS];
	int count;
};

static int64_t span_tolerance(const struct gp_design *d)
{
	return d->proof.span_tolerance ? d->proof.span_tolerance
				       : DEFAULT_SPAN_TOLERANCE;
}

static int64_t outline_tolerance(const struct gp_design *d)
{
	return d->proof.outline_tolerance ? d->proof.outline_tolerance
					  : DEFAULT_OUTLINE_TOLERANCE;
}

static struct proof_dim *add_dim(struct dim_list *list, enum proof_side side,
				 int order, int64_t a, int64_t b)
{
	if (list->count == MAX_DIMS || a == b)
		return NULL;
	struct proof_dim *d = &list->items[list->count++];
	memset(d, 0, sizeof(*d));
	d->side = side;
	d->order = order;
	d->a = a < b ? a : b;
	d->b = a < b ? b : a;
	return d;
}

/* A dimension whose text is its value, with a prefix. */
static struct proof_dim *value_dim(struct dim_list *list,
				   enum proof_side side, int order, int64_t a,
				   int64_t b, const char *prefix,
				   int64_t tolerance, bool reference)
{
	struct proof_dim *d = add_dim(list, side, order, a, b);
	if (!d)
		return NULL;
	char v[32], t[32];
	proof_dim_mm(v, sizeof(v), d->b - d->a);
	proof_dim_mm(t, sizeof(t), tolerance);
	snprintf(d->label, sizeof(d->label), "%s", prefix);
	if (reference)
		snprintf(d->value, sizeof(d->value), "(%s)", v);
	else if (tolerance)
		snprintf(d->value, sizeof(d->value), "%s \xc2\xb1%s", v, t);
	else
		snprintf(d->value, sizeof(d->value), "%s", v);
	return d;
}

/* Extension lines from the feature at both ends. */
static void from_feature(struct proof_dim *d, int64_t feature)
{
	if (d) {
		d->has_feature_a = d->has_feature_b = true;
		d->feature_a = d->feature_b = feature;
	}
}

static void from_features(struct proof_dim *d, bool has_a, int64_t fa,
			  bool has_b, int64_t fb)
{
	if (d) {
		d->has_feature_a = has_a;
		d->feature_a = fa;
		d->has_feature_b = has_b;
		d->feature_b = fb;
	}
}

/* --- pads ----------------------------------------------------------------- */

/* The pads of one ledge, sorted along its side. */
struct pad_row {
	enum gp_side side;        /* of the glass */
	bool vertical;            /* along y (a left or right ledge) */
	int64_t first, second, last;  /* pad centres along */
	struct gp_box first_box;      /* the first pad along */
	int first_pin, last_pin;      /* lowest and highest numbers */
	int64_t low_pin_at, high_pin_at; /* their centres along */
	size_t count;
	const char *name;
};

static size_t find_pad_rows(const struct gp_build *build, struct pad_row *rows,
			    size_t max)
{
	size_t n = 0;
	for (size_t l = 0; l < build->ledge_count && n < max; l++) {
		const struct gp_ledge *ledge = &build->ledges[l];
		struct pad_row r = { .side = ledge->side, .name = ledge->name,
				     .vertical = ledge->side == GP_SIDE_LEFT ||
						 ledge->side == GP_SIDE_RIGHT,
				     .first = INT64_MAX, .second = INT64_MAX,
				     .last = INT64_MIN, .first_pin = INT32_MAX,
				     .last_pin = 0 };
		for (size_t i = 0; i < build->pin_count; i++) {
			const struct gp_pin *pin = &build->pins[i];
			if (pin->ledge != (int)l)
				continue;
			int64_t along = r.vertical ? pin->centre.y
						   : pin->centre.x;
			if (along < r.first) {
				r.second = r.first;
				r.first = along;
				r.first_box = pin->box;
			} else if (along < r.second) {
				r.second = along;
			}
			if (along > r.last)
				r.last = along;
			if (pin->number < r.first_pin) {
				r.first_pin = pin->number;
				r.low_pin_at = along;
			}
			if (pin->number > r.last_pin) {
				r.last_pin = pin->number;
				r.high_pin_at = along;
			}
			r.count++;
		}
		if (r.count)
			rows[n++] = r;
	}
	return n;
}

static enum proof_side proof_side_of(enum gp_side side)
{
	static const enum proof_side sides[GP_SIDE_COUNT] = {
		SIDE_BOTTOM, SIDE_RIGHT, SIDE_TOP, SIDE_LEFT
	};
	return sides[side];
}

/* The edge of the pad nearest the glass edge, across the row. */
static int64_t pad_outer(const struct pad_row *r)
{
	switch (r->side) {
	case GP_SIDE_BOTTOM:
		return r->first_box.y0;
	case GP_SIDE_TOP:
		return r->first_box.y1;
	case GP_SIDE_LEFT:
		return r->first_box.x0;
	default:
		return r->first_box.x1;
	}
}

/* --- the overview's list of dimensions --------------------------------------- */

/* Orders: what is placed first sits nearest the glass. */
enum { ORDER_PITCH, ORDER_SPAN, ORDER_PART, ORDER_PLATE };

static void block_dims(const struct gp_design *d, struct dim_list *list)
{
	int64_t tol = span_tolerance(d);
	size_t count = d->block_count < MAX_DIM_BLOCKS ? d->block_count
						       : MAX_DIM_BLOCKS;
	for (size_t i = 0; i < count; i++) {
		const struct gp_block *b = &d->blocks[i];
		struct gp_box e = gp_block_extent(b);
		char prefix[64];
		if (b->cells > 1) {
			struct gp_point last =
				gp_block_dot(b, 0, b->cells - 1, 0, 0);
			snprintf(prefix, sizeof(prefix), "%s cells 1-%ld: ",
				 b->name, b->cells);
			if (b->cells > 2)
				from_feature(value_dim(list, SIDE_TOP,
						       ORDER_PITCH, b->origin.x,
						       b->origin.x +
							       b->cell_pitch,
						       "cell pitch ", 0, true),
					     e.y1);
			from_features(value_dim(list, SIDE_TOP, ORDER_SPAN,
						d->front.box.x0, b->origin.x,
						"", 0, false),
				      false, 0, true, e.y1);
			from_feature(value_dim(list, SIDE_TOP, ORDER_SPAN,
					       b->origin.x, last.x, prefix, tol,
					       false),
				     e.y1);
		}
		if (b->lines > 1) {
			struct gp_point last =
				gp_block_dot(b, b->lines - 1, 0, 0, 0);
			snprintf(prefix, sizeof(prefix), "%s lines 1-%ld: ",
				 b->name, b->lines);
			if (b->lines > 2)
				from_feature(value_dim(list, SIDE_RIGHT,
						       ORDER_PITCH,
						       b->origin.y -
							       b->line_pitch,
						       b->origin.y,
						       "line pitch ", 0, true),
					     e.x1);
			from_feature(value_dim(list, SIDE_RIGHT, ORDER_SPAN,
					       last.y, b->origin.y, prefix, tol,
					       false),
				     e.x1);
		}
	}
}

static void digit_dims(const struct gp_design *d, struct dim_list *list)
{
	int64_t tol = span_tolerance(d);
	size_t count = d->digit_count < MAX_DIM_BLOCKS ? d->digit_count
						       : MAX_DIM_BLOCKS;
	for (size_t i = 0; i < count; i++) {
		const struct gp_digits *r = &d->digits[i];
		int64_t top = r->origin.y + r->figure.height;
		from_features(value_dim(list, SIDE_BOTTOM, ORDER_SPAN,
					d->front.box.x0, r->origin.x, "", 0,
					false),
			      false, 0, true, r->origin.y);
		from_features(value_dim(list, SIDE_LEFT, ORDER_SPAN,
					d->front.box.y0, r->origin.y, "", 0,
					false),
			      false, 0, true, r->origin.x);
		if (r->count < 2)
			continue;
		int64_t last = r->origin.x + (r->count - 1) * r->pitch;
		char prefix[64];
		snprintf(prefix, sizeof(prefix), "%s digits 1-%ld: ", r->name,
			 r->count);
		if (r->count > 2)
			from_feature(value_dim(list, SIDE_TOP, ORDER_PITCH,
					       r->origin.x,
					       r->origin.x + r->pitch,
					       "digit pitch ", 0, true),
				     top);
		from_feature(value_dim(list, SIDE_TOP, ORDER_SPAN, r->origin.x,
				       last, prefix, tol, false),
			     top);
	}
}

/* The fill port: its place from the plate's edge and its width. */
static void port_dims(const struct gp_design *d, struct dim_list *list)
{
	if (!d->routing || !d->routing->seal.given)
		return;
	const struct gp_seal_spec *s = &d->routing->seal;
	struct gp_box in, out;
	gp_seal_boxes(d, &in, &out);
	int64_t a, b, lo, hi;
	gp_seal_port_span(d, &a, &b, &lo, &hi);
	enum proof_side side = proof_side_of(s->port_side);
	int64_t feature = s->port_side == GP_SIDE_BOTTOM ? out.y0
			  : s->port_side == GP_SIDE_TOP  ? out.y1
			  : s->port_side == GP_SIDE_LEFT ? out.x0
							 : out.x1;
	bool along_x = side == SIDE_TOP || side == SIDE_BOTTOM;
	int64_t edge = along_x ? d->front.box.x0 : d->front.box.y0;
	from_features(value_dim(list, side, ORDER_PART, edge, a, "", 0,
				false),
		      false, 0, true, feature);
	from_feature(value_dim(list, side, ORDER_PART, a, b, "fill port ", 0,
			       false),
		     feature);
}

static void pad_dims(const struct gp_build *build, struct dim_list *list)
{
	struct pad_row rows[MAX_PAD_ROWS];
	size_t n = find_pad_rows(build, rows, MAX_PAD_ROWS);
	const struct gp_design *d = build->design;
	int64_t tol = span_tolerance(d);
	for (size_t k = 0; k < n; k++) {
		const struct pad_row *r = &rows[k];
		enum proof_side side = proof_side_of(r->side);
		int64_t feature = pad_outer(r);
		if (r->count > 2)
			from_feature(value_dim(list, side, ORDER_PITCH,
					       r->first, r->second,
					       "pad pitch ", 0, true),
				     feature);
		int64_t edge = r->vertical ? d->front.box.y0 : d->front.box.x0;
		char prefix[64];
		snprintf(prefix, sizeof(prefix), "pin %d: ", r->first_pin);
		from_features(value_dim(list, side, ORDER_SPAN, edge,
					r->low_pin_at, prefix, 0, false),
			      false, 0, true, feature);
		if (r->count > 1) {
			snprintf(prefix, sizeof(prefix), "pads %d-%d: ",
				 r->first_pin, r->last_pin);
			from_feature(value_dim(list, side, ORDER_SPAN,
					       r->first, r->last, prefix, tol,
					       false),
				     feature);
		}
	}
}

static void plate_dims(const struct gp_design *d, struct dim_list *list)
{
	struct gp_box f = d->front.box, b = d->back.box, v = d->viewing;
	int64_t tol = outline_tolerance(d);
	/* viewing area: position from the front plate's edges, and size */
	value_dim(list, SIDE_TOP, ORDER_PART, f.x0, v.x0, "", 0, false);
	value_dim(list, SIDE_TOP, ORDER_PART, v.x0, v.x1, "viewing area ", 0,
		  false);
	value_dim(list, SIDE_LEFT, ORDER_PART, f.y0, v.y0, "", 0, false);
	value_dim(list, SIDE_LEFT, ORDER_PART, v.y0, v.y1, "viewing area ", 0,
		  false);
	/* plates */
	value_dim(list, SIDE_TOP, ORDER_PLATE, f.x0, f.x1, "front plate ", tol,
		  false);
	if (b.x0 != f.x0 || b.x1 != f.x1)
		value_dim(list, SIDE_TOP, ORDER_PLATE, b.x0, b.x1,
			  "back plate ", tol, false);
	value_dim(list, SIDE_LEFT, ORDER_PLATE, f.y0, f.y1, "front plate ",
		  tol, false);
	if (b.y0 != f.y0 || b.y1 != f.y1)
		value_dim(list, SIDE_LEFT, ORDER_PLATE, b.y0, b.y1,
			  "back plate ", tol, false);
	/* ledges: where one plate runs past the other */
	if (f.y0 != b.y0)
		value_dim(list, SIDE_RIGHT, ORDER_PART, f.y0 < b.y0 ? f.y0 : b.y0,
			  f.y0 < b.y0 ? b.y0 : f.y0, "ledge ", 0, false);
	if (f.y1 != b.y1)
		value_dim(list, SIDE_RIGHT, ORDER_PART, f.y1 < b.y1 ? f.y1 : b.y1,
			  f.y1 < b.y1 ? b.y1 : f.y1, "ledge ", 0, false);
	if (f.x0 != b.x0)
		value_dim(list, SIDE_BOTTOM, ORDER_PART,
			  f.x0 < b.x0 ? f.x0 : b.x0, f.x0 < b.x0 ? b.x0 : f.x0,
			  "ledge ", 0, false);
	if (f.x1 != b.x1)
		value_dim(list, SIDE_BOTTOM, ORDER_PART,
			  f.x1 < b.x1 ? f.x1 : b.x1, f.x1 < b.x1 ? b.x1 : f.x1,
			  "ledge ", 0, false);
}

static void overview_dim_list(const struct gp_build *build,
			      struct dim_list *list)
{
	list->count = 0;
	block_dims(build->design, list);
	digit_dims(build->design, list);
	pad_dims(build, list);
	port_dims(build->design, list);
	plate_dims(build->design, list);
}

static struct gp_box glass_of(const struct gp_design *d)
{
	return gp_box_union(d->front.box, d->back.box);
}

/* --- pin labels ---------------------------------------------------------------- */

/* Each ledge's lowest and highest pin numbers, outside the glass edge
 * beyond their pads, with an arrow to the edge. */
struct pin_label {
	char text[24];
	struct proof_rect box;    /* the text's box, view frame */
	double x, y;              /* baseline start */
	double tip_x, tip_y, dx, dy; /* the arrow: tip on the glass edge */
};

#define MAX_PIN_LABELS (2 * GP_MAX_LEDGES)

static size_t pin_labels(struct proof *p, const struct proof_frame *f,
			 struct pin_label *labels)
{
	struct pad_row rows[MAX_PAD_ROWS];
	size_t n = find_pad_rows(p->build, rows, MAX_PAD_ROWS), count = 0;
	proof_letter(p, PROOF_LETTER, true);
	double em = proof_em(PROOF_LETTER, true);
	double h = PROOF_BOX * em;
	for (size_t k = 0; k < n; k++) {
		const struct pad_row *r = &rows[k];
		enum proof_side side = proof_side_of(r->side);
		for (int end = 0; end < 2; end++) {
			if (end == 1 && r->last_pin == r->first_pin)
				continue;
			struct pin_label *l = &labels[count++];
			int pin = end ? r->last_pin : r->first_pin;
			int64_t at = end ? r->high_pin_at : r->low_pin_at;
			if (pin == 1)
				snprintf(l->text, sizeof(l->text), "pin 1");
			else
				snprintf(l->text, sizeof(l->text), "%d", pin);
			double w = proof_text_width(p, l->text);
			double along = f->scale * gp_mm(at);
			double x, y;
			proof_rv_point(f, side, along, 0, &l->tip_x, &l->tip_y);
			/* the arrow 0.3 to 2.1 mm out, the text beyond */
			proof_rv_point(f, side, along, 2.4, &x, &y);
			l->dx = l->dy = 0;
			switch (side) {
			case SIDE_TOP:
				l->dy = 1;
				l->box = (struct proof_rect){ x - w / 2, y - h,
							      x + w / 2, y };
				break;
			case SIDE_BOTTOM:
				l->dy = -1;
				l->box = (struct proof_rect){ x - w / 2, y,
							      x + w / 2, y + h };
				break;
			case SIDE_LEFT:
				l->dx = 1;
				l->box = (struct proof_rect){ x - w, y - h / 2,
							      x, y + h / 2 };
				break;
			default:
				l->dx = -1;
				l->box = (struct proof_rect){ x, y - h / 2,
							      x + w, y + h / 2 };
				break;
			}
			l->x = l->box.x0;
			l->y = l->box.y0 + PROOF_ASCENT * em;
		}
	}
	return count;
}

static void draw_pin_labels(struct proof *p, const struct pin_label *labels,
			    size_t count)
{
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	proof_letter(p, PROOF_LETTER, true);
	for (size_t i = 0; i < count; i++) {
		const struct pin_label *l = &labels[i];
		double tx = l->tip_x - l->dx * 0.3, ty = l->tip_y - l->dy * 0.3;
		double bx = tx - l->dx * 1.8, by = ty - l->dy * 1.8;
		cairo_move_to(p->cr, tx, ty);
		cairo_line_to(p->cr, bx - l->dy * 0.9, by + l->dx * 0.9);
		cairo_line_to(p->cr, bx + l->dy * 0.9, by - l->dx * 0.9);
		cairo_close_path(p->cr);
		cairo_fill(p->cr);
		cairo_move_to(p->cr, l->x, l->y);
		cairo_show_text(p->cr, l->text);
		cairo_new_path(p->cr);
	}
}

/* --- the overview ---------------------------------------------------------------- */

struct overview_place {
	struct proof_frame frame;
	struct proof_space space;
	struct dim_list list;
	struct pin_label labels[MAX_PIN_LABELS];
	size_t label_count;
};

static void overview_place(struct proof *p, double scale,
			   struct overview_place *o)
{
	proof_frame_init(&o->frame, glass_of(p->design), scale);
	proof_space_init(&o->space);
	o->label_count = pin_labels(p, &o->frame, o->labels);
	for (size_t i = 0; i < o->label_count; i++)
		proof_space_add_text(&o->space, o->labels[i].box);
	overview_dim_list(p->build, &o->list);
	proof_place_dims(p, &o->space, &o->frame, o->list.items,
			 (size_t)o->list.count);
}

void proof_overview_room(struct proof *p, double scale,
			 double room[SIDE_COUNT])
{
	struct overview_place *o = malloc(sizeof(*o));
	if (!o) {
		for (int i = 0; i < SIDE_COUNT; i++)
			room[i] = 40;
		return;
	}
	overview_place(p, scale, o);
	proof_space_room(&o->space, &o->frame, room);
	proof_space_finish(&o->space);
	free(o);
}

static void overview_note(struct proof *p, char *buffer, size_t size)
{
	char a[32], b[32];
	proof_dim_mm(a, sizeof(a), span_tolerance(p->design));
	proof_dim_mm(b, sizeof(b), outline_tolerance(p->design));
	snprintf(buffer, size,
		 "Dimensions in mm. Values in parentheses are reference "
		 "values without tolerance. Spans of cells, lines and pads "
		 "\xc2\xb1%s, plates \xc2\xb1%s. Scale %d:%d.",
		 a, b, p->plan.scale_num, p->plan.scale_den);
}

double proof_overview_note_height(struct proof *p, double width)
{
	char note[512];
	overview_note(p, note, sizeof(note));
	proof_letter(p, PROOF_LETTER, false);
	return proof_paragraph_height(p, width, PROOF_LETTER, note);
}

void proof_overview_dims(struct proof *p)
{
	struct overview_place *o = malloc(sizeof(*o));
	if (!o)
		return;
	overview_place(p, p->view.s, o);
	cairo_save(p->cr);
	cairo_translate(p->cr, p->view.ox, p->view.oy);
	proof_draw_dims(p, &o->space, &o->frame, o->list.items,
			(size_t)o->list.count);
	draw_pin_labels(p, o->labels, o->label_count);
	cairo_restore(p->cr);
	proof_space_finish(&o->space);
	free(o);

	char note[512];
	overview_note(p, note, sizeof(note));
	double x0, y0, x1, y1;
	proof_area(p, &x0, &y0, &x1, &y1);
	proof_letter(p, PROOF_LETTER, false);
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	proof_paragraph(p, x0, PROOF_TOP + PROOF_ASCENT *
					     proof_em(PROOF_LETTER, false),
			x1 - x0, PROOF_LETTER, note);
}

/* Pin labels on the layer sheets, where the overview has them. */
void proof_pin_labels(struct proof *p)
{
	struct proof_frame f;
	struct pin_label labels[MAX_PIN_LABELS];
	proof_frame_init(&f, glass_of(p->design), p->view.s);
	size_t n = pin_labels(p, &f, labels);
	cairo_save(p->cr);
	cairo_translate(p->cr, p->view.ox, p->view.oy);
	draw_pin_labels(p, labels, n);
	cairo_restore(p->cr);
}

/* --- the ruler ---------------------------------------------------------------- */

void proof_ruler(struct proof *p)
{
	double x = p->plan.ruler_x, y = p->plan.ruler_y;
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	proof_line(p, x, y, x + GP_PROOF_RULER_MM, y, 0.15);
	proof_letter(p, PROOF_LETTER, false);
	double em = proof_em(PROOF_LETTER, false);
	for (int mm = 0; mm <= GP_PROOF_RULER_MM; mm++) {
		double len = mm % 10 == 0 ? 4.0 : mm % 5 == 0 ? 3.0 : 1.8;
		double below = mm % 50 == 0 ? 2.5 : 0.0;
		proof_line(p, x + mm, y + below, x + mm, y - len, 0.1);
		if (mm % 20 == 0)
			proof_textf(p, x + mm, y - 4.6 - PROOF_DESCENT * em,
				    ALIGN_CENTRE, "%d", mm);
	}
	proof_text(p, x, y - 4.6 - PROOF_DESCENT * em - proof_line_pitch(
							       PROOF_LETTER),
		   ALIGN_LEFT, "100 mm: check the print scale");
}

/* --- detail views --------------------------------------------------------------- */

/* Enlargements recommended by ISO 5455 (from memory), largest first;
 * 10:1 unless the view does not fit on the sheet. */
static const int enlargements[] = { 10, 5, 2, 1 };

#define DETAIL_GAP 8.0
#define MAX_NOTES 6

enum detail_kind { DETAIL_PLAN, DETAIL_SIDE };

struct detail {
	enum detail_kind kind;
	char title[64];
	struct gp_box window;     /* glass frame (the side view: its own) */
	struct dim_list dims;
	char notes[MAX_NOTES][96];/* under the view */
	int note_count;
	const char *missing;      /* text when there is nothing to show */
	int scale;                /* enlargement chosen */
	double room[SIDE_COUNT];
	double w, h;              /* paper size of the view with its room */
	int sheet;                /* 0-based among the detail sheets */
	double x, y;              /* top-left corner on that sheet */
	/* side view */
	int64_t thickness, gap, ledge_edge, back_edge;
};

static void add_note(struct detail *d, const char *format, ...)
	__attribute__((format(printf, 2, 3)));

static void add_note(struct detail *d, const char *format, ...)
{
	if (d->note_count == MAX_NOTES)
		return;
	va_list args;
	va_start(args, format);
	vsnprintf(d->notes[d->note_count++], sizeof(d->notes[0]), format,
		  args);
	va_end(args);
}

static struct gp_box around(struct gp_box b, int64_t m)
{
	return gp_box_grow(b, m);
}

static void detail_cell(const struct gp_build *build, struct detail *d)
{
	snprintf(d->title, sizeof(d->title), "One dot-matrix cell");
	if (!build->design->block_count) {
		d->missing = "no dot-matrix blocks in this design";
		return;
	}
	const struct gp_block *b = &build->design->blocks[0];
	struct gp_point o = b->origin;
	struct gp_point last =
		gp_block_dot(b, 0, 0, b->dots_down - 1, b->dots_across - 1);
	struct gp_box cell = gp_box_make(o.x, last.y - b->dot_height,
					 last.x + b->dot_width, o.y);
	int64_t m = b->dot_pitch_x - b->dot_width + 100 * 1000;
	d->window = around(cell, m);
	struct dim_list *l = &d->dims;
	from_feature(value_dim(l, SIDE_TOP, 0, o.x, o.x + b->dot_width, "", 0,
			       false),
		     o.y);
	if (b->dots_across > 1)
		from_feature(value_dim(l, SIDE_TOP, 1, o.x, o.x + b->dot_pitch_x,
				       "pitch ", 0, false),
			     o.y);
	from_feature(value_dim(l, SIDE_TOP, 2, cell.x0, cell.x1, "cell ", 0,
			       false),
		     o.y);
	from_feature(value_dim(l, SIDE_LEFT, 0, o.y - b->dot_height, o.y, "",
			       0, false),
		     o.x);
	if (b->dots_down > 1)
		from_feature(value_dim(l, SIDE_LEFT, 1, o.y - b->dot_pitch_y,
				       o.y, "pitch ", 0, false),
			     o.x);
	from_feature(value_dim(l, SIDE_LEFT, 2, cell.y0, cell.y1, "cell ", 0,
			       false),
		     o.x);
}

/* The box of the pixels of the first icon or digit (digits: the first
 * digit met that is not a sign). */
static bool owned_box(const struct gp_artwork *art, int kind,
		      struct gp_box *box)
{
	*box = gp_box_none();
	bool any = false;
	int unit = -1;
	for (size_t i = 0; i < art->pixel_count; i++) {
		const struct gp_pixel *px = &art->pixels[i];
		if (px->owner_kind != kind || px->owner != 0)
			continue;
		if (kind == GP_OWNER_DIGITS) {
			if (px->a == 0)
				continue;
			if (unit < 0)
				unit = px->a;
			if (px->a != unit)
				continue;
		}
		*box = any ? gp_box_union(*box, px->box) : px->box;
		any = true;
	}
	return any;
}

static void detail_icon(const struct gp_build *build, struct detail *d)
{
	struct gp_box box;
	snprintf(d->title, sizeof(d->title), "One icon");
	const struct gp_design *design = build->design;
	if (!design->icon_count ||
	    !owned_box(&build->art, GP_OWNER_ICON, &box)) {
		d->missing = "no icons in this design";
		return;
	}
	const struct gp_icon *icon = &design->icons[0];
	snprintf(d->title, sizeof(d->title), "Icon '%s'", icon->name);
	struct gp_point c = icon->position;
	char a[32], b[32];
	/* the nominal shape, not the lit spur of its lead */
	switch (icon->kind) {
	case GP_ICON_CIRCLE:
	case GP_ICON_RING:
		box = gp_box_make(c.x - icon->diameter / 2,
				  c.y - icon->diameter / 2,
				  c.x + icon->diameter / 2,
				  c.y + icon->diameter / 2);
		proof_dim_mm(a, sizeof(a), icon->diameter);
		d->window = around(box, 300 * 1000);
		from_feature(value_dim(&d->dims, SIDE_TOP, 0, box.x0, box.x1,
				       "\xc3\x98", 0, false),
			     c.y);
		if (icon->kind == GP_ICON_RING) {
			proof_dim_mm(b, sizeof(b), icon->line);
			add_note(d, "ring \xc3\x98%s, width %s", a, b);
		}
		return;
	case GP_ICON_RECTANGLE:
	case GP_ICON_ROUNDED_RECTANGLE:
		if (icon->rotation % 180 == 0) {
			box = gp_box_make(c.x - icon->size[0] / 2,
					  c.y - icon->size[1] / 2,
					  c.x + icon->size[0] / 2,
					  c.y + icon->size[1] / 2);
		}
		break;
	case GP_ICON_TEXT:
		proof_dim_mm(a, sizeof(a), icon->style.cap_height);
		add_note(d, "text \"%.40s\", cap height %s", icon->text, a);
		break;
	default:
		break;
	}
	d->window = around(box, 300 * 1000);
	value_dim(&d->dims, SIDE_TOP, 0, box.x0, box.x1, "", 0, false);
	value_dim(&d->dims, SIDE_LEFT, 0, box.y0, box.y1, "", 0, false);
}

static void detail_digit(const struct gp_build *build, struct detail *d)
{
	struct gp_box box;
	snprintf(d->title, sizeof(d->title), "One digit");
	const struct gp_design *design = build->design;
	if (!design->digit_count ||
	    !owned_box(&build->art, GP_OWNER_DIGITS, &box)) {
		d->missing = "no digits in this design";
		return;
	}
	const struct gp_digits *r = &design->digits[0];
	const struct gp_figure_spec *fig = &r->figure;
	snprintf(d->title, sizeof(d->title), "Digit of row '%s'", r->name);
	/* digit 1: its upright outline leant by the slant, and its point */
	double lean = tan(fig->slant * 3.14159265358979323846 / 180);
	int64_t reach = (int64_t)llround(lean * (double)fig->height);
	box = gp_box_make(r->origin.x + (reach < 0 ? reach : 0), r->origin.y,
			  r->origin.x + fig->width + (reach > 0 ? reach : 0),
			  r->origin.y + fig->height);
	if (r->point_mask)
		box.x1 += r->point_gap + r->point_size;
	d->window = around(box, 400 * 1000);
	/* the upright outline the figure is drawn in: width and height; the
	 * stroke down from the top */
	int64_t x0 = r->origin.x, y0 = r->origin.y;
	int64_t top = y0 + fig->height;
	from_feature(value_dim(&d->dims, SIDE_BOTTOM, 0, x0, x0 + fig->width,
			       "", 0, false),
		     y0);
	from_feature(value_dim(&d->dims, SIDE_LEFT, 1, y0, top, "", 0, false),
		     x0);
	from_feature(value_dim(&d->dims, SIDE_LEFT, 0, top - fig->stroke, top,
			       "stroke ", 0, false),
		     x0);
	char a[32], b[32];
	proof_dim_mm(a, sizeof(a), fig->stroke);
	proof_dim_mm(b, sizeof(b), fig->gap);
	add_note(d, "stroke %s, gap %s between segments", a, b);
	add_note(d, "slant %.3g\xc2\xb0 (top to the %s)",
		 fig->slant < 0 ? -fig->slant : fig->slant,
		 fig->slant < 0 ? "left" : "right");
	if (r->point_mask) {
		proof_dim_mm(a, sizeof(a), r->point_size);
		proof_dim_mm(b, sizeof(b), r->point_gap);
		add_note(d, "point %s, %s clear of the digit", a, b);
	}
	if (r->colon_mask) {
		proof_dim_mm(a, sizeof(a), r->colon_size);
		add_note(d, "colon dots %s", a);
	}
	add_note(d, "the upright outline, before the slant");
}

/* One view per ledge: a few pads with the glass edge. */
static void detail_pads(const struct gp_build *build, struct detail *d,
			const struct pad_row *r)
{
	snprintf(d->title, sizeof(d->title), "Pads of ledge '%s'", r->name);
	struct gp_box first = r->first_box;
	int64_t pitch = r->count > 1 ? r->second - r->first : 0;
	int64_t shown = pitch * (r->count < 3 ? (int64_t)r->count - 1 : 2);
	struct gp_box group = first;
	struct gp_box g = glass_of(build->design);
	if (r->vertical)
		group.y1 += shown;
	else
		group.x1 += shown;
	/* reach to the glass edge */
	switch (r->side) {
	case GP_SIDE_BOTTOM:
		group.y0 = g.y0;
		break;
	case GP_SIDE_TOP:
		group.y1 = g.y1;
		break;
	case GP_SIDE_LEFT:
		group.x0 = g.x0;
		break;
	default:
		group.x1 = g.x1;
		break;
	}
	d->window = around(group, 300 * 1000);
	struct dim_list *l = &d->dims;
	int64_t outer = pad_outer(r);
	if (r->vertical) {
		int64_t edge = r->side == GP_SIDE_LEFT ? g.x0 : g.x1;
		value_dim(l, SIDE_LEFT, 0, first.y0, first.y1, "", 0, false);
		if (pitch)
			value_dim(l, SIDE_LEFT, 1, first.y0, first.y0 + pitch,
				  "pitch ", 0, false);
		value_dim(l, SIDE_TOP, 0, first.x0, first.x1, "", 0, false);
		from_features(value_dim(l, SIDE_TOP, 0, edge, outer,
					"to edge ", 0, false),
			      false, 0, false, 0);
	} else {
		int64_t edge = r->side == GP_SIDE_BOTTOM ? g.y0 : g.y1;
		value_dim(l, SIDE_TOP, 0, first.x0, first.x1, "", 0, false);
		if (pitch)
			value_dim(l, SIDE_TOP, 1, first.x0, first.x0 + pitch,
				  "pitch ", 0, false);
		value_dim(l, SIDE_LEFT, 0, first.y0, first.y1, "", 0, false);
		value_dim(l, SIDE_LEFT, 1, edge, outer, "to edge ", 0, false);
	}
}

/* A corner of the seal: the viewing area, the seal band, the glass edge
 * (top-left, away from the usual ledge). */
static void detail_seal(const struct gp_build *build, struct detail *d)
{
	const struct gp_design *design = build->design;
	snprintf(d->title, sizeof(d->title), "Seal at the top-left corner");
	if (!design->routing || !design->routing->seal.given) {
		d->missing = "no seal in this design";
		return;
	}
	struct gp_box in, out, v = design->viewing;
	struct gp_box g = glass_of(design);
	gp_seal_boxes(design, &in, &out);
	int64_t m = 1000 * 1000;
	d->window = gp_box_make(g.x0 - 200000, v.y1 - m, v.x0 + m,
				g.y1 + 200000);
	struct dim_list *l = &d->dims;
	value_dim(l, SIDE_TOP, 0, g.x0, out.x0, "", 0, false);
	from_feature(value_dim(l, SIDE_TOP, 0, out.x0, in.x0, "seal ", 0,
			       false),
		     v.y1);
	from_feature(value_dim(l, SIDE_TOP, 0, in.x0, v.x0, "", 0, false),
		     v.y1);
	value_dim(l, SIDE_LEFT, 0, out.y1, g.y1, "", 0, false);
	from_feature(value_dim(l, SIDE_LEFT, 0, in.y1, out.y1, "seal ", 0,
			       false),
		     v.x0);
	from_feature(value_dim(l, SIDE_LEFT, 0, v.y1, in.y1, "", 0, false),
		     v.x0);
	char a[32], b[32];
	proof_dim_mm(a, sizeof(a), design->routing->seal.width);
	proof_dim_mm(b, sizeof(b), design->routing->seal.distance);
	add_note(d, "seal width %s, %s outside the viewing area", a, b);
}

static bool first_of_role(const struct gp_artwork *art, enum gp_role role,
			  struct gp_box *box, size_t *count)
{
	*count = 0;
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->role != role || s->layer > GP_LAYER_BACK_ITO)
			continue;
		if (!*count)
			*box = gp_polygon_bounds(&s->poly);
		(*count)++;
	}
	return *count > 0;
}

static void detail_transfer(const struct gp_build *build, struct detail *d)
{
	struct gp_box box;
	size_t count;
	snprintf(d->title, sizeof(d->title), "One common transfer");
	if (!first_of_role(&build->art, GP_ROLE_TRANSFER, &box, &count) &&
	    !(build->design->routing &&
	      first_of_role(&build->art, GP_ROLE_TRANSFER, &box, &count))) {
		d->missing = "no common transfers in this artwork";
		return;
	}
	const struct gp_design *design = build->design;
	struct gp_box g = glass_of(design);
	int64_t size = design->routing->transfers.size;
	int64_t cx = (box.x0 + box.x1) / 2, cy = (box.y0 + box.y1) / 2;
	struct gp_box dot = gp_box_make(cx - size / 2, cy - size / 2,
					cx + size / 2, cy + size / 2);
	d->window = around(box, 300 * 1000);
	from_feature(value_dim(&d->dims, SIDE_TOP, 0, dot.x0, dot.x1,
			       "\xc3\x98", 0, false),
		     cy);
	char a[32], b[32];
	proof_dim_mm(a, sizeof(a), cx - g.x0);
	proof_dim_mm(b, sizeof(b), cy - g.y0);
	add_note(d, "%zu transfer pads; this one at (%s, %s)", count, a, b);
	add_note(d, "from the glass's lower-left corner");
}

static void detail_mark(const struct gp_build *build, struct detail *d)
{
	struct gp_box box;
	size_t count;
	snprintf(d->title, sizeof(d->title), "One alignment mark");
	if (!first_of_role(&build->art, GP_ROLE_MARK, &box, &count)) {
		d->missing = "no alignment marks in this artwork";
		return;
	}
	struct gp_box g = glass_of(build->design);
	d->window = around(box, 300 * 1000);
	value_dim(&d->dims, SIDE_TOP, 0, box.x0, box.x1, "", 0, false);
	value_dim(&d->dims, SIDE_LEFT, 0, box.y0, box.y1, "", 0, false);
	char a[32], b[32];
	proof_dim_mm(a, sizeof(a), (box.x0 + box.x1) / 2 - g.x0);
	proof_dim_mm(b, sizeof(b), (box.y0 + box.y1) / 2 - g.y0);
	add_note(d, "%zu mark shapes; this one at (%s, %s)", count, a, b);
	add_note(d, "from the glass's lower-left corner");
}

/* The plate stack in section through the ledge: x is the glass's y (or x
 * for a side ledge), y the thickness from the back plate's outer face. */
static void detail_side(const struct gp_build *build, struct detail *d)
{
	const struct gp_design *design = build->design;
	d->kind = DETAIL_SIDE;
	snprintf(d->title, sizeof(d->title), "Side view: plate stack");
	const struct gp_drive_spec *drive = &design->drive;
	d->thickness = drive->has_thickness ? drive->glass_thickness
					    : 700 * 1000;
	d->gap = design->electrical.cell_gap;
	struct gp_box f = design->front.box, b = design->back.box;
	/* the plate that runs past the other, at the bottom edge */
	d->ledge_edge = f.y0 < b.y0 ? f.y0 : b.y0;
	d->back_edge = f.y0 < b.y0 ? b.y0 : f.y0;
	int64_t t = d->thickness, gap = d->gap, total = 2 * t + gap;
	int64_t x1 = d->back_edge + 3 * 1000 * 1000;
	d->window = gp_box_make(d->ledge_edge - 200000, -200000, x1,
				total + 200000);
	struct dim_list *l = &d->dims;
	from_feature(value_dim(l, SIDE_RIGHT, 0, 0, t, "", 0, false), x1);
	from_feature(value_dim(l, SIDE_RIGHT, 0, t, t + gap, "", 0, false),
		     x1);
	from_feature(value_dim(l, SIDE_RIGHT, 0, t + gap, total, "", 0, false),
		     x1);
	from_feature(value_dim(l, SIDE_RIGHT, 1, 0, total, "total ", 0, false),
		     x1);
	value_dim(l, SIDE_BOTTOM, 0, d->ledge_edge, d->back_edge, "ledge ", 0,
		  false);
	char a[32], c[32];
	proof_dim_mm(a, sizeof(a), t);
	proof_dim_mm(c, sizeof(c), gap);
	if (drive->has_thickness)
		add_note(d, "glass %s mm each plate, cell gap %s mm", a, c);
	else
		add_note(d, "glass thickness not given (drawn %s mm); cell "
			    "gap %s mm", a, c);
	add_note(d, "viewer above; thickness drawn to scale");
}

/* Picks the largest enlargement at which the view fits in aw x ah. */
static void detail_fit(struct proof *p, struct detail *d, double aw,
		       double ah)
{
	double ww = gp_mm(gp_box_width(d->window));
	double wh = gp_mm(gp_box_height(d->window));
	size_t n = sizeof(enlargements) / sizeof(enlargements[0]), k = 0;
	double head = proof_line_pitch(PROOF_LETTER_TITLE) +
		      proof_line_pitch(PROOF_LETTER) + 2;
	double foot = d->note_count * proof_line_pitch(PROOF_LETTER) + 2;
	for (;; k++) {
		struct proof_frame f;
		struct proof_space s;
		struct dim_list dims = d->dims;
		proof_frame_init(&f, d->window, enlargements[k]);
		proof_space_init(&s);
		proof_place_dims(p, &s, &f, dims.items, (size_t)dims.count);
		proof_space_room(&s, &f, d->room);
		proof_space_finish(&s);
		d->scale = enlargements[k];
		d->w = d->scale * ww + d->room[SIDE_LEFT] + d->room[SIDE_RIGHT];
		d->h = d->scale * wh + d->room[SIDE_TOP] +
		       d->room[SIDE_BOTTOM] + head + foot;
		if ((d->w <= aw && d->h <= ah) || k + 1 == n)
			break;
	}
	/* wide enough for its title and notes */
	proof_letter(p, PROOF_LETTER_TITLE, true);
	double least = proof_text_width(p, d->title);
	proof_letter(p, PROOF_LETTER, false);
	for (int i = 0; i < d->note_count; i++)
		if (proof_text_width(p, d->notes[i]) > least)
			least = proof_text_width(p, d->notes[i]);
	if (d->w < least)
		d->w = least;
}

#define DETAIL_COUNT (8 + GP_MAX_LEDGES)

/* Shelf packing of the views over as many sheets as they need; returns
 * the number of sheets. */
static int details_plan(struct proof *p, const struct gp_proof_plan *plan,
			struct detail *details)
{
	const struct gp_build *build = p->build;
	memset(details, 0, DETAIL_COUNT * sizeof(*details));
	int n = 0;
	detail_cell(build, &details[n++]);
	detail_icon(build, &details[n++]);
	detail_digit(build, &details[n++]);
	struct pad_row rows[MAX_PAD_ROWS];
	size_t row_count = find_pad_rows(build, rows, MAX_PAD_ROWS);
	for (size_t k = 0; k < row_count; k++)
		detail_pads(build, &details[n++], &rows[k]);
	detail_seal(build, &details[n++]);
	detail_transfer(build, &details[n++]);
	detail_mark(build, &details[n++]);
	detail_side(build, &details[n++]);
	double x0 = PROOF_MARGIN + 4, y0 = PROOF_TOP;
	double x1 = plan->paper_w - PROOF_MARGIN - 4;
	double y1 = proof_area_bottom(plan);
	int sheet = 0;
	double x = x0, y = y0, shelf = 0;
	for (int i = 0; i < DETAIL_COUNT; i++) {
		struct detail *d = &details[i];
		d->sheet = -1;    /* a note under the first sheet's views */
		if (d->missing || !d->title[0])
			continue;
		detail_fit(p, d, x1 - x0, y1 - y0);
		if (x > x0 && x + d->w > x1) {
			x = x0;
			y += shelf + DETAIL_GAP;
			shelf = 0;
		}
		if (y > y0 && y + d->h > y1) {
			sheet++;
			x = x0;
			y = y0;
			shelf = 0;
		}
		d->sheet = sheet;
		d->x = x;
		d->y = y;
		x += d->w + DETAIL_GAP;
		if (d->h > shelf)
			shelf = d->h;
	}
	return sheet + 1;
}

int proof_detail_sheet_count(struct proof *p)
{
	struct detail *details = calloc(DETAIL_COUNT, sizeof(*details));
	if (!details)
		return 1;
	int n = details_plan(p, &p->plan, details);
	free(details);
	return n;
}

static void draw_side(struct proof *p, const struct detail *d,
		      const struct proof_view *v)
{
	int64_t t = d->thickness, gap = d->gap;
	int64_t x1 = d->window.x1;
	/* back plate below (from its edge), front plate above (from the
	 * ledge edge) */
	struct gp_box back = gp_box_make(d->back_edge, 0, x1, t);
	struct gp_box front = gp_box_make(d->ledge_edge, t + gap, x1,
					  2 * t + gap);
	proof_set_colour(p, (struct rgb){ 0.85, 0.9, 0.93 }, 1.0);
	proof_add_box(p, v, back);
	proof_add_box(p, v, front);
	cairo_fill(p->cr);
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	cairo_set_line_width(p->cr, 0.25);
	proof_add_box(p, v, back);
	proof_add_box(p, v, front);
	cairo_stroke(p->cr);
}

static void draw_detail(struct proof *p, const struct detail *d)
{
	cairo_t *cr = p->cr;
	cairo_set_source_rgb(cr, 0, 0, 0);
	double title_y = d->y + PROOF_ASCENT * proof_em(PROOF_LETTER_TITLE,
							  true);
	proof_letter(p, PROOF_LETTER_TITLE, true);
	proof_text(p, d->x, title_y, ALIGN_LEFT, d->title);
	proof_letter(p, PROOF_LETTER, false);
	double scale_y = title_y + proof_line_pitch(PROOF_LETTER_TITLE);
	proof_textf(p, d->x, scale_y, ALIGN_LEFT, "scale %d:1", d->scale);
	double head = proof_line_pitch(PROOF_LETTER_TITLE) +
		      proof_line_pitch(PROOF_LETTER) + 2;
	double s = d->scale;
	struct proof_view v;
	memset(&v, 0, sizeof(v));
	v.s = s;
	v.windowed = true;
	v.window = d->window;
	v.ox = d->x + d->room[SIDE_LEFT] - s * gp_mm(d->window.x0);
	v.oy = d->y + head + d->room[SIDE_TOP] + s * gp_mm(d->window.y1);
	cairo_save(cr);
	proof_add_box(p, &v, d->window);
	cairo_clip(cr);
	if (d->kind == DETAIL_SIDE) {
		draw_side(p, d, &v);
	} else {
		proof_fill_layer(p, &v, GP_LAYER_SEAL, ~0u, proof_seal_colour,
				 0.45);
		proof_fill_layer(p, &v, GP_LAYER_FRONT_ITO, ~0u,
				 proof_front_colour, 0.45);
		proof_fill_layer(p, &v, GP_LAYER_BACK_ITO, ~0u,
				 proof_back_colour, 0.45);
		proof_viewing_area(p, &v);
		proof_plate_outlines(p, &v, true, true);
	}
	cairo_restore(cr);
	cairo_set_source_rgb(cr, 0.4, 0.4, 0.4);
	cairo_set_line_width(cr, 0.15);
	proof_add_box(p, &v, d->window);
	cairo_stroke(cr);
	/* the same placement as when it was fitted */
	struct proof_frame f;
	struct proof_space space;
	struct dim_list *dims = malloc(sizeof(*dims));
	if (!dims)
		return;
	*dims = d->dims;
	proof_frame_init(&f, d->window, s);
	proof_space_init(&space);
	proof_place_dims(p, &space, &f, dims->items, (size_t)dims->count);
	cairo_save(cr);
	cairo_translate(cr, v.ox, v.oy);
	proof_draw_dims(p, &space, &f, dims->items, (size_t)dims->count);
	cairo_restore(cr);
	proof_space_finish(&space);
	free(dims);
	cairo_set_source_rgb(cr, 0, 0, 0);
	proof_letter(p, PROOF_LETTER, false);
	double y = v.oy - s * gp_mm(d->window.y0) + d->room[SIDE_BOTTOM] +
		   PROOF_ASCENT * proof_em(PROOF_LETTER, false);
	for (int i = 0; i < d->note_count; i++) {
		proof_text(p, d->x, y, ALIGN_LEFT, d->notes[i]);
		y += proof_line_pitch(PROOF_LETTER);
	}
}

/* What the design has no view of, where notes go. */
static void detail_notes(struct proof *p, const struct detail *details)
{
	double x, y, w;
	proof_note_area(p, &x, &y, &w);
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	proof_letter(p, PROOF_LETTER, false);
	char text[1024] = "Not in this design:";
	bool any = false;
	for (int i = 0; i < DETAIL_COUNT; i++) {
		if (!details[i].missing)
			continue;
		size_t n = strlen(text);
		snprintf(text + n, sizeof(text) - n, "%s %s", any ? ";" : "",
			 details[i].missing);
		any = true;
	}
	if (any)
		proof_paragraph(p, x, y, w, PROOF_LETTER, text);
}

void proof_sheets_details(struct proof *p)
{
	struct detail *details = calloc(DETAIL_COUNT, sizeof(*details));
	if (!details)
		return;
	int sheets = details_plan(p, &p->plan, details);
	for (int sheet = 0; sheet < sheets; sheet++) {
		char title[64];
		if (sheets > 1)
			snprintf(title, sizeof(title), "Details (%d of %d)",
				 sheet + 1, sheets);
		else
			snprintf(title, sizeof(title), "Details");
		p->sheet_scale = "as shown";
		proof_begin_sheet(p, title);
		for (int i = 0; i < DETAIL_COUNT; i++)
			if (details[i].sheet == sheet)
				draw_detail(p, &details[i]);
		if (sheet == 0)
			detail_notes(p, details);
		proof_end_sheet(p);
	}
	free(details);
}
