/* The proof's tables: pins, the drive and ordering spec, the check
 * results, and the cautions. */
#include "proof-internal.h"

#include "check.h"
#include "drive.h"
#include "pinmap.h"
#include "route.h"
#include "units.h"

#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define ROW_H 3.8          /* table row height, mm */
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
	struct gp_buffer what;
	gp_buffer_init(&what);
	gp_net_drives(p->build, net, &what);
	snprintf(buffer, size, "%.*s (%ld pixel%s)", (int)what.size,
		 what.data ? what.data : "", u->pixels,
		 u->pixels == 1 ? "" : "s");
	gp_buffer_finish(&what);
}

/* --- table layout -------------------------------------------------------------- */

#define MAX_COLUMNS 8
/* The pin matrix is lettered at 2.5 mm capitals (ISO 3098's least
 * height, from memory), rows 5 mm apart. */
#define MATRIX_ROW 5.0
#define MATRIX_TOP 20.0
#define TABLE_GAP 4.0      /* between columns of a table on one sheet */

struct table {
	const char *const *header;
	const double *widths;
	int columns;
	double width;             /* sum of widths */
};

/* Without routing: the nets in their numbering order. */
static const char *const net_header[] = { "Pin", "Net", "Plate", "Kind",
					  "Drives" };
static const double net_widths[] = { 12, 16, 14, 18, 66 };

static struct table net_table(void)
{
	struct table t = { net_header, net_widths, 5, 0 };
	for (int i = 0; i < t.columns; i++)
		t.width += t.widths[i];
	return t;
}

static void table_capacity(const struct gp_proof_plan *plan, double width,
			   int *rows, int *columns)
{
	double w = plan->paper_w - 2 * PROOF_MARGIN - 8;
	double h = plan->paper_h - 2 * PROOF_MARGIN - PROOF_TITLE_H - 8 -
		   TABLE_TOP - ROW_H;
	*columns = (int)((w + TABLE_GAP) / (width + TABLE_GAP));
	if (*columns < 1)
		*columns = 1;
	*rows = (int)(h / ROW_H);
	if (*rows < 1)
		*rows = 1;
}

/* The pin matrix on paper: Pin, Net, then a band of commons, each
 * column as wide as its widest entry (measured in the face it is set in);
 * a glass with more commons than a sheet holds across gets a band per set
 * of sheets.  Columns of pins side by side where they fit; a column clear
 * of the title block runs down to the frame.  Of the ways to split the
 * commons into bands, the one with the fewest sheets (then the fewest
 * bands, so that a pin's commons stay on one line). */
struct matrix_layout {
	double pin_w, net_w;
	const double *com_w;      /* per common */
	size_t band;              /* commons per band */
	size_t bands;
	int rows, long_rows;      /* pins per table column: above the title
				   * block, beside it */
	double usable, title_x;   /* paper x where the title block starts */
	int sheets;
	const int *filled;        /* per row, filled cells before each common */
	size_t commons, rows_total;
};

#define MATRIX_PAD 2.5        /* a column's text to the next column */

static double matrix_text_width(struct proof *p, const char *text, bool bold)
{
	proof_letter(p, PROOF_LETTER, bold);
	return proof_text_width(p, text) + MATRIX_PAD;
}

/* Each common's column width, measured once (tens of thousands of cells
 * on a large glass), and per row the count of filled cells before each
 * common (a band shows the rows it has something in). */
static bool matrix_widths(struct proof *p)
{
	const struct gp_pin_matrix *m = &p->matrix;
	if (p->matrix_widths || !m->commons)
		return true;
	size_t stride = m->commons + 1;
	double *w = calloc(m->commons, sizeof(*w));
	int *filled = malloc((m->rows ? m->rows : 1) * stride *
			     sizeof(*filled));
	if (!w || !filled) {
		free(w);
		free(filled);
		return false;
	}
	for (size_t r = 0; r < m->rows; r++) {
		int *row = &filled[r * stride];
		row[0] = 0;
		for (size_t k = 0; k < m->commons; k++)
			row[k + 1] = row[k] +
				     (gp_pin_matrix_cell(m, r, k)[0] != '\0');
	}
	p->matrix_filled = filled;
	for (size_t k = 0; k < m->commons; k++) {
		char head[32];
		snprintf(head, sizeof(head), "COM%zu", k + 1);
		w[k] = matrix_text_width(p, head, true);
	}
	proof_letter(p, PROOF_LETTER, false);
	for (size_t r = 0; r < m->rows; r++)
		for (size_t k = 0; k < m->commons; k++) {
			const char *cell = gp_pin_matrix_cell(m, r, k);
			if (!cell[0])
				continue;
			double cw = proof_text_width(p, cell) + MATRIX_PAD;
			if (cw > w[k])
				w[k] = cw;
		}
	p->matrix_widths = w;
	return true;
}

/* A band shows the pins with something at its commons; a pin with
 * nothing at any common (not connected, unused) shows in the first. */
static bool row_shown(const struct matrix_layout *l, size_t row,
		      size_t first, size_t count)
{
	if (!l->filled)
		return true;
	const int *f = &l->filled[row * (l->commons + 1)];
	return f[first + count] > f[first] || (first == 0 && !f[l->commons]);
}

static size_t band_rows(const struct matrix_layout *l, size_t first,
			size_t count)
{
	size_t n = 0;
	for (size_t r = 0; r < l->rows_total; r++)
		n += row_shown(l, r, first, count);
	return n;
}

static double band_width(const struct matrix_layout *l, size_t first,
			 size_t count)
{
	double w = l->pin_w + l->net_w;
	for (size_t k = first; k < first + count; k++)
		w += l->com_w[k] < l->usable - l->pin_w - l->net_w
			     ? l->com_w[k]
			     : l->usable - l->pin_w - l->net_w;
	return w;
}

/* Pins a sheet holds in columns of a table width wide. */
static size_t sheet_capacity(const struct matrix_layout *l, double width,
			     double x0)
{
	size_t n = 0;
	for (double x = x0; x + width <= x0 + l->usable + 0.01;
	     x += width + TABLE_GAP)
		n += (size_t)(x + width <= l->title_x - TABLE_GAP ? l->long_rows
								  : l->rows);
	return n ? n : (size_t)l->rows;
}

static int band_sheets(const struct matrix_layout *l, size_t first,
		       size_t count, double x0)
{
	size_t pins = band_rows(l, first, count);
	size_t per = sheet_capacity(l, band_width(l, first, count), x0);
	return pins ? (int)((pins + per - 1) / per) : 1;
}

static int layout_sheets(const struct matrix_layout *l, size_t commons,
			 size_t band, double x0)
{
	int sheets = 0;
	for (size_t first = 0; first < commons; first += band)
		sheets += band_sheets(l, first,
				      commons - first < band ? commons - first
							     : band,
				      x0);
	return sheets ? sheets : 1;
}

static void matrix_layout(struct proof *p, struct matrix_layout *l)
{
	const struct gp_pin_matrix *m = &p->matrix;
	const struct gp_build *build = p->build;
	const struct gp_proof_plan *plan = &p->plan;
	memset(l, 0, sizeof(*l));
	static const double none = 0;
	l->com_w = p->matrix_widths ? p->matrix_widths : &none;
	l->filled = p->matrix_filled;
	l->commons = m->commons;
	l->rows_total = m->rows;
	double x0 = PROOF_MARGIN + 4;
	l->usable = plan->paper_w - 2 * PROOF_MARGIN - 8;
	l->title_x = plan->paper_w - PROOF_MARGIN - PROOF_TITLE_W;
	l->pin_w = matrix_text_width(p, "Pin", true);
	double w = matrix_text_width(p, "0000", false);
	if (w > l->pin_w)
		l->pin_w = w;
	l->net_w = matrix_text_width(p, "Net", true);
	for (size_t r = 0; r < m->rows; r++) {
		const struct gp_pin *pin = m->pins[r];
		w = matrix_text_width(p, pin->net >= 0
					      ? build->art.nets[pin->net].name
					      : "NC", false);
		if (w > l->net_w)
			l->net_w = w;
	}
	double top = PROOF_MARGIN + 4 + MATRIX_TOP + MATRIX_ROW;
	l->rows = (int)((plan->paper_h - PROOF_MARGIN - PROOF_TITLE_H - 4 -
			 top) / MATRIX_ROW);
	l->long_rows = (int)((plan->paper_h - PROOF_MARGIN - 2 - top) /
			     MATRIX_ROW);
	if (l->rows < 1)
		l->rows = 1;
	size_t commons = m->commons;
	l->band = commons ? commons : 1;
	l->bands = 1;
	l->sheets = band_sheets(l, 0, commons, x0);
	if (band_width(l, 0, commons) > l->usable)
		l->sheets = 1 << 30;
	for (size_t bands = 2; bands <= commons; bands++) {
		size_t band = (commons + bands - 1) / bands;
		if ((commons + band - 1) / band != bands)
			continue;
		bool fit = true;
		for (size_t first = 0; first < commons; first += band)
			fit = fit && band_width(l, first,
						commons - first < band
							? commons - first
							: band) <= l->usable;
		int sheets = layout_sheets(l, commons, band, x0);
		if ((fit || band == 1) && sheets < l->sheets) {
			l->band = band;
			l->bands = bands;
			l->sheets = sheets;
		}
	}
	if (l->sheets == 1 << 30)
		l->sheets = layout_sheets(l, commons, l->band, x0);
}

int proof_pin_sheet_count(struct proof *p)
{
	const struct gp_build *build = p->build;
	if (!build->pin_count || !p->has_matrix) {
		int rows, columns;
		struct table t = net_table();
		table_capacity(&p->plan, t.width, &rows, &columns);
		size_t per = (size_t)rows * (size_t)columns;
		size_t n = build->art.net_count;
		return n ? (int)((n + per - 1) / per) : 1;
	}
	if (!matrix_widths(p))
		return 1;
	struct matrix_layout l;
	matrix_layout(p, &l);
	return l.sheets;
}

static void table_row(struct proof *p, double x, double y,
		      const struct table *t, const char *const *cells,
		      bool header)
{
	proof_font(p, 2.2, header);
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	for (int i = 0; i < t->columns; i++) {
		proof_text(p, x + 1, y + ROW_H - 1.1, ALIGN_LEFT, cells[i]);
		x += t->widths[i];
	}
}

static void table_rule(struct proof *p, double x, double y, double w)
{
	cairo_set_source_rgb(p->cr, 0.6, 0.6, 0.6);
	proof_line(p, x, y, x + w, y, 0.1);
}

static void net_row(struct proof *p, const struct table *t, double x,
		    double y, int net)
{
	const struct gp_net *n = &p->art->nets[net];
	char pin[16], drives[128];
	if (n->pin > 0)
		snprintf(pin, sizeof(pin), "%d", n->pin);
	else
		snprintf(pin, sizeof(pin), "-");
	proof_net_drives(p, net, drives, sizeof(drives));
	const char *cells[5] = {
		pin, n->name, n->plate == GP_PLATE_FRONT ? "front" : "back",
		n->kind == GP_NET_COMMON ? "common" : "segment", drives,
	};
	table_row(p, x, y, t, cells, false);
}

bool proof_pins_create(struct proof *p)
{
	if (!p->build->pin_count)
		return true;
	p->has_matrix = gp_pin_matrix_init(&p->matrix, p->build);
	return p->has_matrix;
}

void proof_pins_destroy(struct proof *p)
{
	if (p->has_matrix)
		gp_pin_matrix_finish(&p->matrix);
	p->has_matrix = false;
	free(p->matrix_widths);
	free(p->matrix_filled);
	p->matrix_widths = NULL;
	p->matrix_filled = NULL;
}

static void sheets_nets(struct proof *p)
{
	int rows, columns;
	struct table t = net_table();
	table_capacity(&p->plan, t.width, &rows, &columns);
	size_t n = p->art->net_count, next = 0;
	for (int sheet = 0; sheet < p->plan.pin_sheets; sheet++) {
		char title[64];
		snprintf(title, sizeof(title), "Pin table (%d of %d)",
			 sheet + 1, p->plan.pin_sheets);
		proof_begin_sheet(p, title);
		double x0, y0, x1, y1;
		proof_area(p, &x0, &y0, &x1, &y1);
		proof_font(p, 2.3, false);
		proof_text(p, x0, y0 + 11, ALIGN_LEFT,
			   "No pins in this artwork (nothing routed): the "
			   "nets in their numbering order.");
		for (int c = 0; c < columns && next < n; c++) {
			double x = x0 + c * (t.width + TABLE_GAP);
			double y = y0 + TABLE_TOP;
			table_row(p, x, y, &t, t.header, true);
			y += ROW_H;
			table_rule(p, x, y, t.width);
			for (int r = 0; r < rows && next < n; r++, next++) {
				net_row(p, &t, x, y, p->pin_order[next]);
				y += ROW_H;
			}
		}
		proof_end_sheet(p);
	}
}

/* One row of the matrix: pin, net, the band's cells. */
static void matrix_row(struct proof *p, const struct matrix_layout *l,
		       double x, double y, size_t row, size_t first,
		       size_t count, bool header)
{
	const struct gp_pin_matrix *m = &p->matrix;
	proof_letter(p, PROOF_LETTER, header);
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	double base = y + MATRIX_ROW - 1.2;
	double room = l->usable - l->pin_w - l->net_w - MATRIX_PAD;
	if (header) {
		proof_text(p, x + 1, base, ALIGN_LEFT, "Pin");
		proof_text(p, x + l->pin_w + 1, base, ALIGN_LEFT, "Net");
	} else {
		const struct gp_pin *pin = m->pins[row];
		proof_textf(p, x + 1, base, ALIGN_LEFT, "%d", pin->number);
		proof_text(p, x + l->pin_w + 1, base, ALIGN_LEFT,
			   pin->net >= 0 ? p->art->nets[pin->net].name : "NC");
	}
	double cx = x + l->pin_w + l->net_w;
	for (size_t k = first; k < first + count; k++) {
		char head[32];
		snprintf(head, sizeof(head), "COM%zu", k + 1);
		const char *text = header ? head
					  : gp_pin_matrix_cell(m, row, k);
		if (l->com_w[k] - MATRIX_PAD > room)
			proof_text_fitted(p, cx + 1, base, room, text);
		else if (text[0])
			proof_text(p, cx + 1, base, ALIGN_LEFT, text);
		cx += l->com_w[k] < room + MATRIX_PAD ? l->com_w[k]
						      : room + MATRIX_PAD;
	}
}

static void sheets_matrix(struct proof *p)
{
	const struct gp_pin_matrix *m = &p->matrix;
	struct matrix_layout l;
	matrix_layout(p, &l);
	int sheet = 0;
	for (size_t first = 0; first < m->commons || first == 0;
	     first += l.band) {
		size_t count = m->commons - first < l.band ? m->commons - first
							   : l.band;
		double width = band_width(&l, first, count);
		size_t next = 0;
		do {
			char title[64];
			snprintf(title, sizeof(title), "Pin matrix (%d of %d)",
				 ++sheet, p->plan.pin_sheets);
			proof_begin_sheet(p, title);
			double x0, y0, x1, y1;
			proof_area(p, &x0, &y0, &x1, &y1);
			proof_letter(p, PROOF_LETTER, false);
			proof_textf(p, x0, y0 + 12, ALIGN_LEFT,
				    "What lights where each pin crosses COM%zu "
				    "to COM%zu; as pin-matrix.csv.%s",
				    first + 1, first + count,
				    l.bands > 1 ? " Pins with nothing there "
						  "are left out." : "");
			while (next < m->rows &&
			       !row_shown(&l, next, first, count))
				next++;
			for (double x = x0; next < m->rows &&
					    x + width <= x0 + l.usable + 0.01;
			     x += width + TABLE_GAP) {
				int rows = x + width <= l.title_x - TABLE_GAP
						   ? l.long_rows
						   : l.rows;
				double y = y0 + MATRIX_TOP;
				matrix_row(p, &l, x, y, 0, first, count, true);
				y += MATRIX_ROW;
				table_rule(p, x, y, width);
				for (int r = 0; r < rows && next < m->rows;
				     r++) {
					matrix_row(p, &l, x, y, next, first,
						   count, false);
					y += MATRIX_ROW;
					do
						next++;
					while (next < m->rows &&
					       !row_shown(&l, next, first,
							  count));
				}
			}
			proof_end_sheet(p);
		} while (next < m->rows);
		if (!m->commons)
			break;
	}
}

void proof_sheets_pins(struct proof *p)
{
	if (p->has_matrix)
		sheets_matrix(p);
	else
		sheets_nets(p);
}

/* --- the drive and ordering spec ------------------------------------------------ */

/* Set in a monospaced face, as the drive report's text is laid out in
 * columns: the glass first, then the report 'glassplot drive' prints. */
#define SPEC_SIZE 2.0
#define SPEC_CHAR (0.6 * SPEC_SIZE)   /* advance of a monospaced em/0.6 */
#define SPEC_LINE 2.9
#define SPEC_COLUMN 100               /* characters */
#define SPEC_GAP 6.0
#define SPEC_INDENT 29                /* the report's value column */

static void spec_pair(struct gp_buffer *out, const char *key,
		      const char *format, ...)
	__attribute__((format(printf, 3, 4)));

static void spec_pair(struct gp_buffer *out, const char *key,
		      const char *format, ...)
{
	char value[256];
	va_list args;
	va_start(args, format);
	vsnprintf(value, sizeof(value), format, args);
	va_end(args);
	gp_buffer_printf(out, "  %-26s %s\n", key, value);
}

static void size_text(char *buffer, size_t size, struct gp_box box)
{
	char w[32], h[32], x[32], y[32];
	proof_mm(w, sizeof(w), gp_box_width(box));
	proof_mm(h, sizeof(h), gp_box_height(box));
	proof_mm(x, sizeof(x), box.x0);
	proof_mm(y, sizeof(y), box.y0);
	snprintf(buffer, size, "%s x %s mm at (%s, %s)", w, h, x, y);
}

static void spec_glass(const struct gp_build *build, struct gp_buffer *out)
{
	const struct gp_design *d = build->design;
	const struct gp_rules *r = &d->rules;
	char text[160], a[32], b[32];
	gp_buffer_printf(out, "Glass\n");
	spec_pair(out, "part number", "%s", d->part);
	spec_pair(out, "revision", "%s", d->revision);
	spec_pair(out, "title", "%s", d->title);
	size_text(text, sizeof(text), d->front.box);
	spec_pair(out, "front plate", "%s", text);
	size_text(text, sizeof(text), d->back.box);
	spec_pair(out, "back plate", "%s", text);
	size_text(text, sizeof(text), d->viewing);
	spec_pair(out, "viewing area", "%s", text);
	spec_pair(out, "segment electrodes on", "%s plate",
		  d->segment_plate == GP_PLATE_FRONT ? "front" : "back");
	spec_pair(out, "nets", "%d commons, %d segments, %zu pixels",
		  build->art.common_count, build->art.segment_count,
		  build->art.pixel_count);
	proof_mm(a, sizeof(a), r->min_line);
	proof_mm(b, sizeof(b), r->min_space);
	spec_pair(out, "ITO line, space", "%s mm, %s mm", a, b);
	proof_mm(a, sizeof(a), r->registration);
	proof_mm(b, sizeof(b), r->edge_clearance);
	spec_pair(out, "registration", "\xc2\xb1%s mm", a);
	spec_pair(out, "edge clearance", "%s mm", b);
	gp_buffer_puts(out, "\n");
}

/* Without a drive section: what the multiplex arithmetic says for the
 * design's commons. */
static void spec_multiplex(const struct gp_build *build,
			   struct gp_buffer *out)
{
	long n = build->art.common_count;
	gp_buffer_printf(out, "Multiplex (no 'drive' or 'optics' section in "
			      "the description)\n");
	if (n < 1)
		return;
	if (n == 1) {
		spec_pair(out, "commons N", "1 (static drive)");
		return;
	}
	long a = gp_drive_best_whole_bias(n);
	spec_pair(out, "commons N", "%ld (duty 1/%ld)", n, n);
	spec_pair(out, "best whole-number bias", "1/%ld (ratio %.3f)", a,
		  gp_drive_ratio(n, (double)a));
	spec_pair(out, "Alt-Pleshko maximum", "%.3f at bias 1/%.3f",
		  gp_drive_ratio_max(n), gp_drive_best_bias(n));
}

static void spec_text(const struct gp_build *build, struct gp_buffer *out)
{
	const struct gp_design *d = build->design;
	spec_glass(build, out);
	if (!d->drive.has_drive && !d->drive.has_optics) {
		spec_multiplex(build, out);
		return;
	}
	/* resolved once by the pipeline; a build whose drive cannot be
	 * computed has failed before it reaches the proof */
	if (build->has_drive)
		gp_drive_format(&build->drive, out);
}

static size_t utf8_length(const char *s, size_t bytes)
{
	size_t n = 0;
	for (size_t i = 0; i < bytes; i++)
		n += ((unsigned char)s[i] & 0xc0) != 0x80;
	return n;
}

/* Bytes of s that hold at most chars characters. */
static size_t utf8_prefix(const char *s, size_t bytes, size_t chars)
{
	size_t i = 0, n = 0;
	while (i < bytes) {
		if (((unsigned char)s[i] & 0xc0) != 0x80 && n++ == chars)
			break;
		i++;
	}
	return i;
}

/* Appends line to out in lines of at most chars characters, breaking at
 * spaces; continuations are indented to the value column. */
static void wrap_line(struct gp_buffer *out, const char *line, size_t bytes,
		      size_t chars)
{
	bool first = true;
	size_t indent = bytes > 2 && line[0] == ' ' ? SPEC_INDENT : 2;
	while (first || bytes) {
		size_t room = first ? chars : chars - indent;
		size_t take = bytes;
		if (utf8_length(line, bytes) > room) {
			take = utf8_prefix(line, bytes, room);
			size_t space = take;
			while (space > 0 && line[space] != ' ')
				space--;
			if (space > 0)
				take = space;
		}
		gp_buffer_printf(out, "%*s%.*s\n", first ? 0 : (int)indent, "",
				 (int)take, line);
		line += take;
		bytes -= take;
		while (bytes && *line == ' ')
			line++, bytes--;
		first = false;
	}
}

struct spec_layout {
	int columns, lines;       /* per sheet */
	size_t chars;             /* per line */
};

static void spec_layout(const struct gp_proof_plan *plan,
			struct spec_layout *l)
{
	double w = plan->paper_w - 2 * PROOF_MARGIN - 8;
	double h = plan->paper_h - 2 * PROOF_MARGIN - PROOF_TITLE_H - 8 -
		   TABLE_TOP;
	double column = SPEC_COLUMN * SPEC_CHAR;
	l->columns = (int)((w + SPEC_GAP) / (column + SPEC_GAP));
	if (l->columns < 1) {
		l->columns = 1;
		l->chars = (size_t)(w / SPEC_CHAR);
	} else {
		l->chars = SPEC_COLUMN;
	}
	l->lines = (int)(h / SPEC_LINE);
	if (l->lines < 1)
		l->lines = 1;
}

/* The spec as wrapped lines; returns their count. */
static size_t spec_lines(const struct gp_build *build, size_t chars,
			 struct gp_buffer *out)
{
	struct gp_buffer text;
	gp_buffer_init(&text);
	spec_text(build, &text);
	size_t count = 0;
	const char *s = text.data ? text.data : "";
	while (*s) {
		const char *end = strchr(s, '\n');
		size_t bytes = end ? (size_t)(end - s) : strlen(s);
		wrap_line(out, s, bytes, chars);
		s += bytes + (end != NULL);
	}
	gp_buffer_finish(&text);
	for (const char *c = out->data; c && *c; c++)
		count += *c == '\n';
	return count;
}

int proof_spec_sheet_count(const struct gp_build *build,
			   const struct gp_proof_plan *plan)
{
	struct spec_layout l;
	spec_layout(plan, &l);
	struct gp_buffer lines;
	gp_buffer_init(&lines);
	size_t n = spec_lines(build, l.chars, &lines);
	gp_buffer_finish(&lines);
	size_t per = (size_t)l.columns * (size_t)l.lines;
	return n ? (int)((n + per - 1) / per) : 1;
}

void proof_sheets_spec(struct proof *p)
{
	struct spec_layout l;
	spec_layout(&p->plan, &l);
	struct gp_buffer lines;
	gp_buffer_init(&lines);
	spec_lines(p->build, l.chars, &lines);
	const char *s = lines.data ? lines.data : "";
	for (int sheet = 0; sheet < p->plan.spec_sheets; sheet++) {
		char title[64];
		if (p->plan.spec_sheets > 1)
			snprintf(title, sizeof(title),
				 "Drive and ordering spec (%d of %d)",
				 sheet + 1, p->plan.spec_sheets);
		else
			snprintf(title, sizeof(title),
				 "Drive and ordering spec");
		proof_begin_sheet(p, title);
		double x0, y0, x1, y1;
		proof_area(p, &x0, &y0, &x1, &y1);
		cairo_set_source_rgb(p->cr, 0, 0, 0);
		proof_font_mono(p, SPEC_SIZE);
		for (int c = 0; c < l.columns; c++) {
			double x = x0 + c * (l.chars * SPEC_CHAR + SPEC_GAP);
			for (int r = 0; r < l.lines && *s; r++) {
				const char *end = strchr(s, '\n');
				char line[512];
				size_t n = end ? (size_t)(end - s) : strlen(s);
				snprintf(line, sizeof(line), "%.*s", (int)n, s);
				proof_text(p, x, y0 + TABLE_TOP + r * SPEC_LINE,
					   ALIGN_LEFT, line);
				s += n + (end != NULL);
			}
		}
		proof_end_sheet(p);
	}
	gp_buffer_finish(&lines);
}

/* --- check results ---------------------------------------------------------------- */

/* Each finding takes three lines of the list: number, severity, rule
 * and nets; place, value and limit; its text. */
#define FINDING_LINES 3
#define FINDING_MARK 2.4          /* marker radius, mm */
#define FINDING_COLUMN 130.0      /* width of a column of the list */

/* Findings marked and listed; report.txt has them all. */
#define MAX_SHOWN_FINDINGS 2000

static size_t finding_count(const struct gp_build *build)
{
	size_t n = build->checked ? build->checks.count : 0;
	return n < MAX_SHOWN_FINDINGS ? n : MAX_SHOWN_FINDINGS;
}

static void finding_capacity(const struct gp_proof_plan *plan, int *rows,
			     int *columns)
{
	double w = plan->paper_w - 2 * PROOF_MARGIN - 8;
	double h = proof_area_bottom(plan) - PROOF_TOP;
	double pitch = proof_line_pitch(PROOF_LETTER);
	*columns = (int)((w + 6) / (FINDING_COLUMN + 6));
	if (*columns < 1)
		*columns = 1;
	*rows = (int)(h / (FINDING_LINES * pitch + 2));
	if (*rows < 1)
		*rows = 1;
}

/* Findings listed per sheet. */
static size_t findings_per_sheet(const struct gp_proof_plan *plan)
{
	int rows, columns;
	finding_capacity(plan, &rows, &columns);
	return (size_t)rows * (size_t)columns;
}

int proof_finding_sheet_count(const struct gp_build *build,
			      const struct gp_proof_plan *plan)
{
	size_t n = finding_count(build), per = findings_per_sheet(plan);
	return 1 + (int)((n + per - 1) / per);
}

static const char *severity_text(enum gp_severity severity)
{
	return severity == GP_SEVERITY_ERROR     ? "error"
	       : severity == GP_SEVERITY_WARNING ? "warning"
						 : "note";
}

/* A numbered marker centred on the finding's place. */
static void finding_mark(struct proof *p, size_t number,
			 const struct gp_finding *f)
{
	double x = proof_x(&p->view, f->place.x);
	double y = proof_y(&p->view, f->place.y);
	char text[24];
	snprintf(text, sizeof(text), "%zu", number);
	proof_letter(p, PROOF_LETTER, true);
	double em = proof_em(PROOF_LETTER, true);
	double r = FINDING_MARK;
	double w = proof_text_width(p, text) / 2 + 0.8;
	if (w > r)
		r = w;
	cairo_new_path(p->cr);
	cairo_arc(p->cr, x, y, r, 0, 6.283185307179586);
	cairo_set_source_rgba(p->cr, 1, 1, 1, 0.85);
	cairo_fill_preserve(p->cr);
	proof_set_colour(p, proof_finding_colour, 1.0);
	cairo_set_line_width(p->cr, 0.3);
	cairo_stroke(p->cr);
	/* the digits' ink centred on the place */
	proof_text(p, x, y + PROOF_LETTER / 2, ALIGN_CENTRE, text);
	(void)em;
}

static void finding_lines(struct proof *p, double x, double y, double w,
			  size_t number, const struct gp_finding *f)
{
	char head[160], where[200], a[32], b[32], value[48], limit[48];
	const char *n0 = f->nets[0] >= 0 ? p->art->nets[f->nets[0]].name : "";
	const char *n1 = f->nets[1] >= 0 ? p->art->nets[f->nets[1]].name : "";
	snprintf(head, sizeof(head), "%zu  %s  %s  %s%s%s", number,
		 severity_text(f->severity), gp_check_rule_name(f->rule), n0,
		 *n0 && *n1 ? " " : "", n1);
	proof_mm(a, sizeof(a), f->place.x);
	proof_mm(b, sizeof(b), f->place.y);
	gp_check_format_value(value, sizeof(value), f->value, f->unit,
			      true);
	gp_check_format_value(limit, sizeof(limit), f->limit, f->unit,
			      true);
	snprintf(where, sizeof(where), "at %s, %s mm: %s (limit %s)", a, b,
		 value, limit);
	double pitch = proof_line_pitch(PROOF_LETTER);
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	proof_letter(p, PROOF_LETTER, true);
	proof_text_fitted(p, x, y, w, head);
	proof_letter(p, PROOF_LETTER, false);
	proof_text_fitted(p, x + 4, y + pitch, w - 4, where);
	cairo_set_source_rgb(p->cr, 0.3, 0.3, 0.3);
	proof_text_fitted(p, x + 4, y + 2 * pitch, w - 4, f->text);
}

static void findings_summary(struct proof *p, double x, double y, double w)
{
	const struct gp_check_report *r = &p->build->checks;
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	proof_letter(p, PROOF_LETTER_TITLE, true);
	if (!p->build->checked) {
		proof_text(p, x, y, ALIGN_LEFT, "The checks did not run.");
		return;
	}
	char text[512];
	if (!r->count)
		snprintf(text, sizeof(text),
			 "No findings: every check passed.");
	else
		snprintf(text, sizeof(text),
			 "%zu finding%s (%zu error%s, %zu warning%s), each "
			 "marked with its number; listed on the next "
			 "sheet%s.",
			 r->count, r->count == 1 ? "" : "s", r->errors,
			 r->errors == 1 ? "" : "s", r->warnings,
			 r->warnings == 1 ? "" : "s",
			 p->plan.finding_sheets > 2 ? "s" : "");
	y = proof_paragraph(p, x, y, w, PROOF_LETTER_TITLE, text);
	proof_letter(p, PROOF_LETTER, false);
	if (r->count > finding_count(p->build)) {
		snprintf(text, sizeof(text),
			 "The first %zu are marked and listed; report.txt "
			 "has them all.",
			 finding_count(p->build));
		y = proof_paragraph(p, x, y, w, PROOF_LETTER, text);
	}
	/* what the checks skipped or stood in for, one line each */
	const char *s = r->notes.data ? r->notes.data : "";
	for (int line = 0; *s && line < 6; line++) {
		const char *end = strchr(s, '\n');
		size_t n = end ? (size_t)(end - s) : strlen(s);
		snprintf(text, sizeof(text), "%.*s", (int)n, s);
		y = proof_paragraph(p, x, y, w, PROOF_LETTER, text);
		s += n + (end != NULL);
	}
}

void proof_sheets_findings(struct proof *p)
{
	const struct gp_check_report *r = &p->build->checks;
	size_t n = finding_count(p->build);
	double x0, y0, x1, y1;
	proof_begin_sheet(p, "Check results");
	proof_area(p, &x0, &y0, &x1, &y1);
	proof_paint_layer(p, GP_LAYER_FRONT_ITO, 0.2);
	proof_paint_layer(p, GP_LAYER_BACK_ITO, 0.2);
	proof_plate_outlines(p, &p->view, true, true);
	findings_summary(p, x0, PROOF_TOP + PROOF_ASCENT *
					     proof_em(PROOF_LETTER_TITLE, true),
			 x1 - x0);
	/* later findings under earlier ones: number 1 stays on top */
	for (size_t i = n; i-- > 0;)
		finding_mark(p, i + 1, &r->findings[i]);
	proof_end_sheet(p);

	int rows, columns;
	finding_capacity(&p->plan, &rows, &columns);
	double pitch = proof_line_pitch(PROOF_LETTER);
	size_t next = 0;
	for (int sheet = 1; sheet < p->plan.finding_sheets; sheet++) {
		char title[64];
		snprintf(title, sizeof(title), "Check results: list (%d of %d)",
			 sheet, p->plan.finding_sheets - 1);
		proof_begin_sheet(p, title);
		for (int c = 0; c < columns && next < n; c++) {
			double x = x0 + c * (FINDING_COLUMN + 6);
			double y = PROOF_TOP + PROOF_ASCENT *
						       proof_em(PROOF_LETTER,
								true);
			for (int k = 0; k < rows && next < n; k++) {
				finding_lines(p, x, y, FINDING_COLUMN,
					      next + 1, &r->findings[next]);
				next++;
				y += FINDING_LINES * pitch + 2;
			}
		}
		proof_end_sheet(p);
	}
}

/* --- cautions ------------------------------------------------------------------------ */

void proof_cautions(struct proof *p)
{
	double x, y, w;
	proof_note_area(p, &x, &y, &w);
	cairo_set_source_rgb(p->cr, 0, 0, 0);
	proof_letter(p, PROOF_LETTER, true);
	proof_text(p, x, y, ALIGN_LEFT, "Cautions");
	proof_letter(p, PROOF_LETTER, false);
	proof_paragraph(p, x, y + proof_line_pitch(PROOF_LETTER), w,
			PROOF_LETTER,
			"Broken glass has sharp edges. Handle liquid-crystal "
			"fluid and solvents as their safety data sheets say. "
			"The drive voltages are low, but the instrument may "
			"carry dangerous voltages. The glass maker's rules and "
			"local regulations take precedence.");
}
