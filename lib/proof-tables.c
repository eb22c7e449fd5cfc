/* The proof's tables: pins, the drive and ordering spec, the check
 * results, and the cautions. */
#include "proof-internal.h"

#include "drive.h"
#include "units.h"

#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define ROW_H 4.5          /* table row height, mm */
#define TABLE_TOP 16.0     /* below the sheet title */

/* --- what each net drives ---------------------------------------------------- */

bool proof_net_use_create(struct proof *p)
{
	size_t n = p->art->net_count;
	p->use = calloc(n ? n : 1, sizeof(*p->use));
	p->pin_order = calloc(n ? n : 1, sizeof(*p->pin_order));
	if (!p->use || !p->pin_order)
		return false;
	for (size_t i = 0; i < n; i++)
		p->use[i].first_pixel = -1;
	for (size_t i = 0; i < p->art->pixel_count; i++) {
		const struct gp_pixel *px = &p->art->pixels[i];
		int nets[2] = { px->common, px->segment };
		for (int k = 0; k < 2; k++) {
			if (nets[k] < 0 || (size_t)nets[k] >= n)
				continue;
			struct proof_net_use *u = &p->use[nets[k]];
			if (u->first_pixel < 0)
				u->first_pixel = (long)i;
			u->pixels++;
		}
	}
	/* pin order: pins assigned first, by pin; then the rest by net */
	size_t k = 0;
	int top = 0;
	for (size_t i = 0; i < n; i++)
		if (p->art->nets[i].pin > top)
			top = p->art->nets[i].pin;
	for (int pin = 1; pin <= top; pin++)
		for (size_t i = 0; i < n; i++)
			if (p->art->nets[i].pin == pin)
				p->pin_order[k++] = (int)i;
	for (size_t i = 0; i < n; i++)
		if (p->art->nets[i].pin <= 0)
			p->pin_order[k++] = (int)i;
	return true;
}

void proof_net_drives(const struct proof *p, int net, char *buffer,
		      size_t size)
{
	const struct proof_net_use *u = &p->use[net];
	if (u->first_pixel < 0) {
		snprintf(buffer, size, "no pixels");
		return;
	}
	const struct gp_pixel *px = &p->art->pixels[u->first_pixel];
	bool common = p->art->nets[net].kind == GP_NET_COMMON;
	char what[96];
	switch (px->owner_kind) {
	case GP_OWNER_BLOCK: {
		const struct gp_block *b = &p->design->blocks[px->owner];
		if (common)
			snprintf(what, sizeof(what), "block %s line %d row %d",
				 b->name, px->a + 1, px->c + 1);
		else if (b->share_segments || b->lines == 1)
			snprintf(what, sizeof(what), "block %s cell %d col %d",
				 b->name, px->b + 1, px->d + 1);
		else
			snprintf(what, sizeof(what),
				 "block %s line %d cell %d col %d", b->name,
				 px->a + 1, px->b + 1, px->d + 1);
		break;
	}
	case GP_OWNER_DIGITS:
		snprintf(what, sizeof(what), "digits %d, digit %d",
			 px->owner + 1, px->a + 1);
		break;
	default:
		snprintf(what, sizeof(what), "icon %d", px->owner + 1);
		break;
	}
	snprintf(buffer, size, "%s (%ld pixel%s)", what, u->pixels,
		 u->pixels == 1 ? "" : "s");
}

/* --- table layout -------------------------------------------------------------- */

static const double pin_columns[] = { 12, 16, 14, 18, 62 };
#define PIN_COLUMNS 5
#define PIN_TABLE_W 126.0

static void table_capacity(const struct gp_proof_plan *plan, double width,
			   int *rows, int *columns)
{
	double w = plan->paper_w - 2 * PROOF_MARGIN - 8;
	double h = plan->paper_h - 2 * PROOF_MARGIN - PROOF_TITLE_H - 8 -
		   TABLE_TOP - ROW_H;
	*columns = (int)(w / (width + 4));
	if (*columns < 1)
		*columns = 1;
	*rows = (int)(h / ROW_H);
	if (*rows < 1)
		*rows = 1;
}

int proof_pin_sheet_count(const struct gp_build *build,
			  const struct gp_proof_plan *plan)
{
	int rows, columns;
	table_capacity(plan, PIN_TABLE_W, &rows, &columns);
	size_t per = (size_t)rows * (size_t)columns;
	size_t n = build->art.net_count;
	return n ? (int)((n + per - 1) / per) : 1;
}

static void table_row(struct proof *p, double x, double y,
		      const double *widths, int count,
		      const char *const *cells, bool header)
{
	proof_font(p, 2.3, header);
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	for (int i = 0; i < count; i++) {
		proof_text(p, x + 1, y + ROW_H - 1.2, ALIGN_LEFT, cells[i]);
		x += widths[i];
	}
}

static void table_rule(struct proof *p, double x, double y, double w)
{
	cairo_set_source_rgb(p->cr, 0.6, 0.6, 0.6);
	proof_line(p, x, y, x + w, y, 0.1);
}

static void pin_row(struct proof *p, double x, double y, int net)
{
	const struct gp_net *n = &p->art->nets[net];
	char pin[16], drives[128];
	if (n->pin > 0)
		snprintf(pin, sizeof(pin), "%d", n->pin);
	else
		snprintf(pin, sizeof(pin), "-");
	proof_net_drives(p, net, drives, sizeof(drives));
	const char *cells[PIN_COLUMNS] = {
		pin, n->name, n->plate == GP_PLATE_FRONT ? "front" : "back",
		n->kind == GP_NET_COMMON ? "common" : "segment", drives,
	};
	table_row(p, x, y, pin_columns, PIN_COLUMNS, cells, false);
}

void proof_sheets_pins(struct proof *p)
{
	static const char *const header[PIN_COLUMNS] = {
		"Pin", "Net", "Plate", "Kind", "Drives",
	};
	int rows, columns;
	table_capacity(&p->plan, PIN_TABLE_W, &rows, &columns);
	size_t n = p->art->net_count, next = 0;
	bool pins = n && p->art->nets[p->pin_order[0]].pin > 0;
	for (int sheet = 0; sheet < p->plan.pin_sheets; sheet++) {
		char title[64];
		snprintf(title, sizeof(title), "Pin table (%d of %d)",
			 sheet + 1, p->plan.pin_sheets);
		proof_begin_sheet(p, title);
		double x0, y0, x1, y1;
		proof_area(p, &x0, &y0, &x1, &y1);
		proof_font(p, 2.3, false);
		proof_text(p, x0, y0 + 11, ALIGN_LEFT,
			   pins ? "Pins in order; the same data as pins.csv."
				: "No pins assigned in this artwork (nothing "
				  "routed): nets in their numbering order.");
		for (int c = 0; c < columns && next < n; c++) {
			double x = x0 + c * (PIN_TABLE_W + 4);
			double y = y0 + TABLE_TOP;
			table_row(p, x, y, pin_columns, PIN_COLUMNS, header,
				  true);
			y += ROW_H;
			table_rule(p, x, y, PIN_TABLE_W);
			for (int r = 0; r < rows && next < n; r++) {
				pin_row(p, x, y, p->pin_order[next++]);
				y += ROW_H;
			}
		}
		proof_end_sheet(p);
	}
}

/* --- the drive and ordering spec ------------------------------------------------ */

struct spec_table {
	struct proof *p;
	double x, y, key_w;
};

static void spec_line(struct spec_table *t, const char *key,
		      const char *format, ...)
	__attribute__((format(printf, 3, 4)));

static void spec_line(struct spec_table *t, const char *key,
		      const char *format, ...)
{
	char value[256];
	va_list args;
	va_start(args, format);
	vsnprintf(value, sizeof(value), format, args);
	va_end(args);
	proof_font(t->p, 2.5, true);
	proof_text(t->p, t->x, t->y, ALIGN_LEFT, key);
	proof_font(t->p, 2.5, false);
	proof_text(t->p, t->x + t->key_w, t->y, ALIGN_LEFT, value);
	t->y += ROW_H + 0.5;
}

static void spec_heading(struct spec_table *t, const char *text)
{
	t->y += 2;
	proof_font(t->p, 3.0, true);
	proof_text(t->p, t->x, t->y, ALIGN_LEFT, text);
	t->y += ROW_H + 1;
}

static void size_text(char *buffer, size_t size, struct gp_box box)
{
	char w[32], h[32], x[32], y[32];
	proof_mm(w, sizeof(w), gp_box_width(box));
	proof_mm(h, sizeof(h), gp_box_height(box));
	proof_mm(x, sizeof(x), box.x0);
	proof_mm(y, sizeof(y), box.y0);
	snprintf(buffer, size, "%s x %s mm, lower-left corner at (%s, %s)", w,
		 h, x, y);
}

static void spec_glass(struct spec_table *t)
{
	const struct gp_design *d = t->p->design;
	char text[160];
	spec_heading(t, "Glass");
	spec_line(t, "Part number", "%s", d->part);
	spec_line(t, "Revision", "%s", d->revision);
	spec_line(t, "Title", "%s", d->title);
	size_text(text, sizeof(text), d->front.box);
	spec_line(t, "Front plate", "%s", text);
	size_text(text, sizeof(text), d->back.box);
	spec_line(t, "Back plate", "%s", text);
	size_text(text, sizeof(text), d->viewing);
	spec_line(t, "Viewing area", "%s", text);
	spec_line(t, "Segment electrodes on", "%s plate",
		  d->segment_plate == GP_PLATE_FRONT ? "front" : "back");
}

static void spec_drive(struct spec_table *t)
{
	const struct gp_artwork *art = t->p->art;
	long n = art->common_count;
	spec_heading(t, "Multiplex drive");
	spec_line(t, "Commons, segments", "%d, %d", art->common_count,
		  art->segment_count);
	spec_line(t, "Pixels", "%zu", art->pixel_count);
	if (n < 1)
		return;
	if (n == 1) {
		spec_line(t, "Duty", "static (1 common)");
		return;
	}
	long a = gp_drive_best_whole_bias(n);
	spec_line(t, "Duty", "1/%ld", n);
	spec_line(t, "Bias (best whole)", "1/%ld, selection ratio %.3f", a,
		  gp_drive_ratio(n, (double)a));
	spec_line(t, "Alt-Pleshko limit", "ratio %.3f at bias 1/%.2f",
		  gp_drive_ratio_max(n), gp_drive_best_bias(n));
}

static void spec_rules(struct spec_table *t)
{
	const struct gp_rules *r = &t->p->design->rules;
	char a[32], b[32], c[32], d[32];
	proof_mm(a, sizeof(a), r->min_line);
	proof_mm(b, sizeof(b), r->min_space);
	proof_mm(c, sizeof(c), r->registration);
	proof_mm(d, sizeof(d), r->edge_clearance);
	spec_heading(t, "Design rules");
	spec_line(t, "ITO line, space", "%s mm, %s mm", a, b);
	spec_line(t, "Registration", "\xc2\xb1%s mm", c);
	spec_line(t, "Edge clearance", "%s mm", d);
}

void proof_sheet_spec(struct proof *p)
{
	proof_begin_sheet(p, "Drive and ordering spec");
	double x0, y0, x1, y1;
	proof_area(p, &x0, &y0, &x1, &y1);
	struct spec_table t = { p, x0, y0 + TABLE_TOP, 55 };
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	spec_glass(&t);
	spec_drive(&t);
	spec_rules(&t);
	proof_end_sheet(p);
}

/* --- check results ---------------------------------------------------------------- */

int proof_finding_sheet_count(const struct gp_build *build,
			      const struct gp_proof_plan *plan)
{
	(void)build;
	(void)plan;
	return 1;
}

void proof_sheets_findings(struct proof *p)
{
	proof_begin_sheet(p, "Check results");
	double x0, y0, x1, y1;
	proof_area(p, &x0, &y0, &x1, &y1);
	proof_fill_layer(p, &p->view, GP_LAYER_FRONT_ITO, ~0u,
			 proof_front_colour, 0.2);
	proof_fill_layer(p, &p->view, GP_LAYER_BACK_ITO, ~0u,
			 proof_back_colour, 0.2);
	proof_plate_outlines(p, &p->view, true, true);
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	proof_font(p, 3.0, true);
	proof_text(p, x0, y0 + 11, ALIGN_LEFT,
		   "No findings: the checks have not run on this build.");
	proof_end_sheet(p);
}

/* --- cautions ------------------------------------------------------------------------ */

/* Writes text in lines no wider than width; returns the y after it. */
static double wrap(struct proof *p, double x, double y, double width,
		   double line, const char *text)
{
	char buffer[1024];
	size_t n = 0;
	const char *word = text;
	while (*word) {
		const char *end = strchr(word, ' ');
		size_t len = end ? (size_t)(end - word) : strlen(word);
		char trial[1024];
		snprintf(trial, sizeof(trial), "%.*s%s%.*s", (int)n, buffer,
			 n ? " " : "", (int)len, word);
		if (n && proof_text_width(p, trial) > width) {
			buffer[n] = '\0';
			proof_text(p, x, y, ALIGN_LEFT, buffer);
			y += line;
			snprintf(buffer, sizeof(buffer), "%.*s", (int)len, word);
		} else {
			snprintf(buffer, sizeof(buffer), "%s", trial);
		}
		n = strlen(buffer);
		word += len;
		while (*word == ' ')
			word++;
	}
	if (n) {
		proof_text(p, x, y, ALIGN_LEFT, buffer);
		y += line;
	}
	return y;
}

void proof_cautions(struct proof *p)
{
	double x = PROOF_MARGIN + 4;
	double y = p->plan.paper_h - PROOF_MARGIN - PROOF_TITLE_H + 3;
	double w = p->plan.paper_w - 2 * PROOF_MARGIN - PROOF_TITLE_W - 8;
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	proof_font(p, 2.6, true);
	proof_text(p, x, y, ALIGN_LEFT, "Cautions");
	proof_font(p, 2.1, false);
	wrap(p, x, y + 3.5, w, 2.7,
	     "Broken glass has sharp edges. Handle liquid-crystal fluid and "
	     "solvents as their safety data sheets say. The drive voltages "
	     "are low, but the instrument may carry dangerous voltages. The "
	     "glass maker's rules and local regulations take precedence.");
}
