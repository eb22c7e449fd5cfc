/* The proof's drawings of the artwork: overview, one sheet per layer and
 * the lit previews.
 *
 * Each layer is one path filled once (so translucent overlays do not
 * darken where shapes of a layer overlap), and the dots of a matrix block
 * are one cell drawn once into a cairo recording surface that every cell
 * repeats: the PDF holds each cell's dots once, as a form, however many
 * cells and sheets show it. */
#include "proof-internal.h"

#include "preview.h"
#include "units.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Positive mode: dark pixels on a light field; negative: the reverse. */
static const struct rgb lit_colours[2] = { { 0.10, 0.12, 0.14 },
					   { 0.86, 0.92, 0.80 } };
static const struct rgb lcd_colours[2] = { { 0.80, 0.84, 0.76 },
					   { 0.10, 0.12, 0.16 } };

static int negative(const struct proof *p)
{
	return p->design->drive.mode == GP_MODE_NEGATIVE;
}
static const struct rgb glass_colour = { 0.93, 0.94, 0.95 };

#define ROLE_BIT(role) (1u << (role))
#define ALL_ROLES (~0u)

/* Adds one ring; reversed when its orientation is not the wanted one, so
 * that the non-zero rule fills outers and leaves holes empty. */
static void add_ring(struct proof *p, const struct proof_view *v,
		     const struct gp_ring *ring, bool outer)
{
	if (ring->count < 3)
		return;
	bool ccw = gp_ring_area2(ring) > 0;
	bool reverse = ccw != outer;
	for (size_t i = 0; i < ring->count; i++) {
		const struct gp_point *q =
			&ring->points[reverse ? ring->count - 1 - i : i];
		if (i == 0)
			cairo_move_to(p->cr, proof_x(v, q->x), proof_y(v, q->y));
		else
			cairo_line_to(p->cr, proof_x(v, q->x), proof_y(v, q->y));
	}
	cairo_close_path(p->cr);
}

void proof_add_polygon(struct proof *p, const struct proof_view *v,
		       const struct gp_polygon *poly)
{
	add_ring(p, v, &poly->outer, true);
	for (size_t i = 0; i < poly->hole_count; i++)
		add_ring(p, v, &poly->holes[i], false);
}

void proof_add_box(struct proof *p, const struct proof_view *v,
		   struct gp_box box)
{
	double x0 = proof_x(v, box.x0), x1 = proof_x(v, box.x1);
	double y0 = proof_y(v, box.y0), y1 = proof_y(v, box.y1);
	cairo_rectangle(p->cr, x0 < x1 ? x0 : x1, y0 < y1 ? y0 : y1,
			x0 < x1 ? x1 - x0 : x0 - x1,
			y0 < y1 ? y1 - y0 : y0 - y1);
}

static bool shape_selected(const struct proof_view *v,
			   const struct gp_shape *s, enum gp_layer layer,
			   unsigned role_mask)
{
	if (s->layer != layer || !(role_mask & ROLE_BIT(s->role)) ||
	    s->line_width != 0)
		return false;
	if (!v->windowed)
		return true;
	struct gp_box b = gp_polygon_bounds(&s->poly);
	return b.x1 >= v->window.x0 && b.x0 <= v->window.x1 &&
	       b.y1 >= v->window.y0 && b.y0 <= v->window.y1;
}

bool proof_has_layer(const struct proof *p, enum gp_layer layer,
		     unsigned role_mask)
{
	for (size_t i = 0; i < p->art->shape_count; i++) {
		const struct gp_shape *s = &p->art->shapes[i];
		if (s->layer == layer && (role_mask & ROLE_BIT(s->role)))
			return true;
	}
	return false;
}

bool proof_has_role(const struct proof *p, enum gp_role role)
{
	for (size_t i = 0; i < p->art->shape_count; i++)
		if (p->art->shapes[i].role == role)
			return true;
	return false;
}

size_t proof_path_layer(struct proof *p, const struct proof_view *v,
			enum gp_layer layer, unsigned role_mask)
{
	size_t count = 0;
	for (size_t i = 0; i < p->art->shape_count; i++) {
		const struct gp_shape *s = &p->art->shapes[i];
		if (!shape_selected(v, s, layer, role_mask))
			continue;
		proof_add_polygon(p, v, &s->poly);
		count++;
	}
	return count;
}

void proof_fill_layer(struct proof *p, const struct proof_view *v,
		      enum gp_layer layer, unsigned role_mask, struct rgb c,
		      double alpha)
{
	cairo_new_path(p->cr);
	if (!proof_path_layer(p, v, layer, role_mask))
		return;
	proof_set_colour(p, c, alpha);
	cairo_set_fill_rule(p->cr, CAIRO_FILL_RULE_WINDING);
	cairo_fill(p->cr);
}

static struct rgb layer_colour(enum gp_layer layer)
{
	switch (layer) {
	case GP_LAYER_FRONT_ITO:
		return proof_front_colour;
	case GP_LAYER_BACK_ITO:
		return proof_back_colour;
	case GP_LAYER_SEAL:
		return proof_seal_colour;
	case GP_LAYER_TRANSFER:
		return proof_transfer_colour;
	default:
		return (struct rgb){ 0, 0, 0 };
	}
}

void proof_paint_layer(struct proof *p, enum gp_layer layer, double alpha)
{
	if (!proof_has_layer(p, layer, ALL_ROLES))
		return;
	if (!p->layers[layer]) {
		cairo_rectangle_t extents = { 0, 0, p->plan.paper_w,
					      p->plan.paper_h };
		cairo_surface_t *surface = cairo_recording_surface_create(
			CAIRO_CONTENT_COLOR_ALPHA, &extents);
		cairo_t *page = p->cr;
		p->cr = cairo_create(surface);
		proof_fill_layer(p, &p->view, layer, ALL_ROLES,
				 layer_colour(layer), 1.0);
		cairo_destroy(p->cr);
		p->cr = page;
		p->layers[layer] = surface;
	}
	cairo_set_source_surface(p->cr, p->layers[layer], 0, 0);
	if (alpha >= 1.0)
		cairo_paint(p->cr);
	else
		cairo_paint_with_alpha(p->cr, alpha);
}

void proof_layers_destroy(struct proof *p)
{
	for (int i = 0; i < GP_LAYER_COUNT; i++) {
		cairo_surface_destroy(p->layers[i]);
		p->layers[i] = NULL;
	}
}

void proof_stroke_lines(struct proof *p, const struct proof_view *v,
			enum gp_layer layer, double width)
{
	cairo_new_path(p->cr);
	bool any = false;
	for (size_t i = 0; i < p->art->shape_count; i++) {
		const struct gp_shape *s = &p->art->shapes[i];
		if (s->layer != layer || s->line_width == 0 ||
		    s->poly.outer.count < 2)
			continue;
		const struct gp_ring *r = &s->poly.outer;
		for (size_t k = 0; k < r->count; k++) {
			double x = proof_x(v, r->points[k].x);
			double y = proof_y(v, r->points[k].y);
			if (k == 0)
				cairo_move_to(p->cr, x, y);
			else
				cairo_line_to(p->cr, x, y);
		}
		if (!s->open_path)
			cairo_close_path(p->cr);
		any = true;
	}
	if (!any)
		return;
	cairo_set_line_width(p->cr, width);
	cairo_stroke(p->cr);
}

/* Plate outlines: front solid, back dashed (the outline layers when the
 * artwork has them, else the plate boxes). */
void proof_plate_outlines(struct proof *p, const struct proof_view *v,
			  bool front, bool back)
{
	cairo_t *cr = p->cr;
	cairo_set_source_rgb(cr, 0, 0, 0);
	for (int k = 0; k < 2; k++) {
		if (!(k ? back : front))
			continue;
		enum gp_layer layer = k ? GP_LAYER_BACK_OUTLINE
					: GP_LAYER_FRONT_OUTLINE;
		if (k) {
			double dash[] = { 3.0, 1.5 };
			cairo_set_dash(cr, dash, 2, 0);
		}
		if (proof_has_layer(p, layer, ROLE_BIT(GP_ROLE_OUTLINE))) {
			proof_stroke_lines(p, v, layer, 0.3);
		} else {
			proof_add_box(p, v, k ? p->design->back.box
					       : p->design->front.box);
			cairo_set_line_width(cr, 0.3);
			cairo_stroke(cr);
		}
		cairo_set_dash(cr, NULL, 0, 0);
	}
}

void proof_viewing_area(struct proof *p, const struct proof_view *v)
{
	double dash[] = { 4.0, 1.0, 0.8, 1.0 };
	cairo_set_dash(p->cr, dash, 4, 0);
	proof_set_colour(p, proof_viewing_colour, 1.0);
	proof_add_box(p, v, p->design->viewing);
	cairo_set_line_width(p->cr, 0.25);
	cairo_stroke(p->cr);
	cairo_set_dash(p->cr, NULL, 0, 0);
}

/* --- pads and pin 1 -------------------------------------------------------- */

void proof_pin1(struct proof *p, const struct proof_view *v)
{
	/* pad outlines so that pads read as pads over the electrodes */
	cairo_new_path(p->cr);
	size_t pads = 0;
	for (enum gp_layer l = GP_LAYER_FRONT_ITO; l <= GP_LAYER_BACK_ITO; l++)
		pads += proof_path_layer(p, v, l, ROLE_BIT(GP_ROLE_PAD));
	if (!pads)
		return;
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	cairo_set_line_width(p->cr, 0.1);
	cairo_stroke(p->cr);
}

/* --- dot-matrix cells ------------------------------------------------------ */

/* One line of a block's cells (paper mm at scale s, origin at the first
 * cell's top-left dot corner): all dots (parity < 0) or the dots whose
 * (row + column) parity, counted on from the first cell, is parity. */
static cairo_surface_t *cell_surface(const struct gp_block *b, double s,
				     int parity, int count, struct rgb lit)
{
	int64_t ch = (b->dots_down - 1) * b->dot_pitch_y + b->dot_height;
	int64_t cw = (b->dots_across - 1) * b->dot_pitch_x + b->dot_width;
	cairo_rectangle_t extents = {
		0, 0, s * gp_mm((count - 1) * b->cell_pitch + cw),
		s * gp_mm(ch)
	};
	cairo_surface_t *surface = cairo_recording_surface_create(
		CAIRO_CONTENT_COLOR_ALPHA, &extents);
	cairo_t *cr = cairo_create(surface);
	for (int cell = 0; cell < count; cell++)
		for (long row = 0; row < b->dots_down; row++)
			for (long col = 0; col < b->dots_across; col++) {
				long k = row + col + cell * b->dots_across;
				if (parity >= 0 && k % 2 != parity)
					continue;
				cairo_rectangle(cr,
						s * gp_mm(cell * b->cell_pitch +
							  col * b->dot_pitch_x),
						s * gp_mm(row * b->dot_pitch_y),
						s * gp_mm(b->dot_width),
						s * gp_mm(b->dot_height));
			}
	cairo_set_source_rgb(cr, lit.r, lit.g, lit.b);
	cairo_fill(cr);
	cairo_destroy(cr);
	return surface;
}

bool proof_cells_create(struct proof *p)
{
	size_t n = p->design->block_count;
	p->cells = calloc(n ? n : 1, sizeof(*p->cells));
	if (!p->cells)
		return false;
	for (size_t i = 0; i < n; i++) {
		const struct gp_block *b = &p->design->blocks[i];
		struct proof_cells *c = &p->cells[i];
		c->scale = p->view.s;
		struct rgb lit = lit_colours[negative(p)];
		int count = (int)b->cells;
		c->all = cell_surface(b, c->scale, -1, count, lit);
		c->even = cell_surface(b, c->scale, 0, count, lit);
		c->odd = cell_surface(b, c->scale, 1, count, lit);
		if (cairo_surface_status(c->all) || cairo_surface_status(c->even) ||
		    cairo_surface_status(c->odd))
			return false;
	}
	return true;
}

void proof_cells_destroy(struct proof *p)
{
	if (!p->cells)
		return;
	for (size_t i = 0; i < p->design->block_count; i++) {
		cairo_surface_destroy(p->cells[i].all);
		cairo_surface_destroy(p->cells[i].even);
		cairo_surface_destroy(p->cells[i].odd);
	}
	free(p->cells);
	p->cells = NULL;
}

/* One paint per line of cells (each line's dots a form the PDF holds
 * once), not one per cell. */
static void block_pixels(struct proof *p, const struct proof_view *v,
			 size_t index, bool checkerboard)
{
	const struct gp_block *b = &p->design->blocks[index];
	const struct proof_cells *c = &p->cells[index];
	for (long line = 0; line < b->lines; line++) {
		cairo_surface_t *s = c->all;
		if (checkerboard)
			s = (line * b->dots_down) % 2 ? c->odd : c->even;
		struct gp_point q = gp_block_dot(b, line, 0, 0, 0);
		cairo_set_source_surface(p->cr, s, proof_x(v, q.x),
					 proof_y(v, q.y));
		cairo_paint(p->cr);
	}
}

void proof_pixels(struct proof *p, const struct proof_view *v,
		  bool checkerboard)
{
	for (size_t i = 0; i < p->design->block_count; i++)
		block_pixels(p, v, i, checkerboard);
	/* digits and icons: their lit shapes, one path */
	cairo_new_path(p->cr);
	bool any = false;
	for (size_t i = 0; i < p->art->pixel_count; i++) {
		const struct gp_pixel *px = &p->art->pixels[i];
		if (px->owner_kind == GP_OWNER_BLOCK)
			continue;
		if (px->shape.outer.count)
			proof_add_polygon(p, v, &px->shape);
		else
			proof_add_box(p, v, px->box);
		for (size_t k = 0; k < px->more.count; k++)
			proof_add_polygon(p, v, &px->more.items[k]);
		any = true;
	}
	if (!any)
		return;
	proof_set_colour(p, lit_colours[negative(p)], 1.0);
	cairo_set_fill_rule(p->cr, CAIRO_FILL_RULE_WINDING);
	cairo_fill(p->cr);
}

/* --- sheets ------------------------------------------------------------------ */

static void fill_seal_and_transfers(struct proof *p, double alpha)
{
	proof_paint_layer(p, GP_LAYER_SEAL, alpha);
	proof_paint_layer(p, GP_LAYER_TRANSFER, 1.0);
}

static void overview_legend(struct proof *p)
{
	proof_legend(p, proof_overview_legend, proof_overview_legend_count);
}

void proof_sheet_overview(struct proof *p)
{
	proof_begin_sheet(p, "Overview: both plates");
	fill_seal_and_transfers(p, 0.45);
	proof_paint_layer(p, GP_LAYER_FRONT_ITO, 0.5);
	proof_paint_layer(p, GP_LAYER_BACK_ITO, 0.5);
	proof_viewing_area(p, &p->view);
	proof_plate_outlines(p, &p->view, true, true);
	proof_pin1(p, &p->view);
	proof_overview_dims(p);
	proof_ruler(p);
	overview_legend(p);
	proof_end_sheet(p);
}

static void note(struct proof *p, const char *text)
{
	double x0, y0, x1, y1;
	proof_area(p, &x0, &y0, &x1, &y1);
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	proof_letter(p, PROOF_LETTER, false);
	proof_paragraph(p, x0, PROOF_TOP + PROOF_ASCENT *
					     proof_em(PROOF_LETTER, false),
			x1 - x0, PROOF_LETTER, text);
}

static void layer_sheet(struct proof *p, enum gp_plate plate)
{
	bool front = plate == GP_PLATE_FRONT;
	enum gp_layer layer = gp_plate_ito_layer(plate);
	proof_begin_sheet(p, front ? "Front plate ITO" : "Back plate ITO");
	note(p, front ? "As seen from the viewer, as front-ito.gbr; "
			"front-ito-coated.gbr is this mirrored, seen from "
			"the plate's coated face."
		      : "As seen from the viewer, through the front plate, "
			"as back-ito.gbr and back-ito-coated.gbr (the "
			"coated face looks towards the viewer).");
	proof_paint_layer(p, layer, 1.0);
	proof_plate_outlines(p, &p->view, front, !front);
	if (proof_has_layer(p, layer, ROLE_BIT(GP_ROLE_PAD))) {
		proof_pin1(p, &p->view);
		proof_pin_labels(p);
	}
	proof_end_sheet(p);
}

static void seal_sheet(struct proof *p)
{
	proof_begin_sheet(p, "Seal and common transfers");
	bool seal = proof_has_layer(p, GP_LAYER_SEAL, ALL_ROLES);
	bool transfers = proof_has_layer(p, GP_LAYER_TRANSFER, ALL_ROLES);
	note(p, seal || transfers
			? "As seen from the viewer; the viewing area for "
			  "reference."
			: "This artwork has no seal and no common transfers "
			  "(nothing routed).");
	fill_seal_and_transfers(p, 1.0);
	proof_viewing_area(p, &p->view);
	proof_plate_outlines(p, &p->view, true, true);
	proof_end_sheet(p);
}

static void outline_sheet(struct proof *p)
{
	proof_begin_sheet(p, "Outlines and marks");
	note(p, proof_has_role(p, GP_ROLE_MARK)
			? "Cut outlines (front solid, back dashed) and "
			  "alignment marks, as seen from the viewer."
			: "Cut outlines (front solid, back dashed), as seen "
			  "from the viewer; this artwork has no alignment "
			  "marks.");
	unsigned marks = ROLE_BIT(GP_ROLE_MARK) | ROLE_BIT(GP_ROLE_TEXT);
	proof_fill_layer(p, &p->view, GP_LAYER_FRONT_ITO, marks,
			 proof_front_colour, 1.0);
	proof_fill_layer(p, &p->view, GP_LAYER_BACK_ITO, marks,
			 proof_back_colour, 1.0);
	proof_plate_outlines(p, &p->view, true, true);
	proof_end_sheet(p);
}

void proof_sheet_layers(struct proof *p)
{
	layer_sheet(p, GP_PLATE_FRONT);
	layer_sheet(p, GP_PLATE_BACK);
	seal_sheet(p);
	outline_sheet(p);
}

void proof_sheet_lit(struct proof *p, bool checkerboard)
{
	proof_begin_sheet(p, checkerboard
				     ? "Lit preview: checkerboard over the "
				       "matrix blocks"
				     : "Lit preview: all pixels on");
	note(p, negative(p) ? "The glass as the viewer sees it (negative "
			      "mode, as the optics section says)."
			    : "The glass as the viewer sees it (positive "
			      "mode).");
	const struct proof_view *v = &p->view;
	proof_set_colour(p, glass_colour, 1.0);
	proof_add_box(p, v, p->design->front.box);
	proof_add_box(p, v, p->design->back.box);
	cairo_fill(p->cr);
	proof_set_colour(p, lcd_colours[negative(p)], 1.0);
	proof_add_box(p, v, p->design->viewing);
	cairo_fill(p->cr);
	proof_pixels(p, v, checkerboard);
	proof_viewing_area(p, v);
	proof_plate_outlines(p, v, true, true);
	if (!checkerboard)
		proof_cautions(p);
	proof_end_sheet(p);
}

/* The glass lit with the content of --show: every pixel whose (common,
 * segment) pair the content drives. */
void proof_sheet_show(struct proof *p)
{
	const struct gp_show *show = p->build->show;
	/* as large as the sheet holds (ISO 5455 enlargements), for a
	 * reviewer to read it like the glass in the hand */
	static const int enlargements[] = { 10, 5, 2, 1 };
	static const char *const scales[] = { "10:1", "5:1", "2:1", "1:1" };
	double x0, y0, x1, y1;
	proof_area(p, &x0, &y0, &x1, &y1);
	y0 = PROOF_TOP + 2 * proof_line_pitch(PROOF_LETTER);
	struct gp_box g = gp_box_union(p->design->front.box,
				       p->design->back.box);
	double gw = gp_mm(gp_box_width(g)), gh = gp_mm(gp_box_height(g));
	size_t k = 0;
	while (k + 1 < 4 && (enlargements[k] * gw > x1 - x0 ||
			     enlargements[k] * gh > y1 - y0))
		k++;
	struct proof_view view = { .s = enlargements[k] };
	if (view.s * gw > x1 - x0 || view.s * gh > y1 - y0)
		view = p->view;   /* reduced, as the overview */
	else {
		view.ox = (x0 + x1 - view.s * gw) / 2 - view.s * gp_mm(g.x0);
		view.oy = (y0 + y1 - view.s * gh) / 2 + view.s * gp_mm(g.y1);
		p->sheet_scale = scales[k];
	}
	const struct proof_view *v = &view;
	char title[160];
	snprintf(title, sizeof(title), "Lit preview: %s", show->spec);
	proof_begin_sheet(p, title);
	note(p, "The glass as the viewer sees it with this content, lit "
		"through the (common, segment) pairs of the firmware map "
		"(glass-map.h).");
	proof_set_colour(p, glass_colour, 1.0);
	proof_add_box(p, v, p->design->front.box);
	proof_add_box(p, v, p->design->back.box);
	cairo_fill(p->cr);
	proof_set_colour(p, lcd_colours[negative(p)], 1.0);
	proof_add_box(p, v, p->design->viewing);
	cairo_fill(p->cr);
	cairo_new_path(p->cr);
	for (size_t i = 0; i < show->pixel_count; i++) {
		if (!show->lit[i])
			continue;
		const struct gp_pixel *px = &p->art->pixels[i];
		if (px->shape.outer.count)
			proof_add_polygon(p, v, &px->shape);
		else
			proof_add_box(p, v, px->box);
		for (size_t n = 0; n < px->more.count; n++)
			proof_add_polygon(p, v, &px->more.items[n]);
	}
	proof_set_colour(p, lit_colours[negative(p)], 1.0);
	cairo_set_fill_rule(p->cr, CAIRO_FILL_RULE_WINDING);
	cairo_fill(p->cr);
	proof_viewing_area(p, v);
	proof_plate_outlines(p, v, true, true);
	proof_end_sheet(p);
}
