/* Tests of the PDF proof, read back with the independent tools of
 * poppler-utils: pdfinfo (page count and sizes), pdftotext (the text a
 * reviewer reads, and with -bbox where it is), pdftoppm (the sheet as
 * printed, to measure the scale in pixels). */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <cmocka.h>

#include "build.h"
#include "model.h"
#include "proof.h"
#include "proof-internal.h"
#include "preview.h"
#include "route.h"

#include <cairo-pdf.h>
#include <cairo-ft.h>
#include <ft2build.h>
#include FT_FREETYPE_H
#include FT_TRUETYPE_TABLES_H
#include "font.h"
#include "units.h"
#include <cairo.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* A glass of our own: one line of 12 cells, large dots so that the
 * rendered strips are many pixels wide. */
static const char sample[] =
	"glass: {part: PRF-012, revision: C, title: proof test glass}\n"
	"front: {size: [60, 30]}\n"
	"back: {size: [60, 24], position: [0, 6]}\n"
	"viewing_area: {position: [4, 10], size: [52, 16]}\n"
	"proof: {revision_date: 2031-04-05, span_tolerance: 0.03}\n"
	"blocks:\n"
	"  main:\n"
	"    origin: [6.5, 22]\n"
	"    cells: [12, 1]\n"
	"    dots: [3, 5]\n"
	"    dot_size: [0.8, 0.9]\n"
	"    dot_pitch: [1.0, 1.1]\n"
	"    cell_pitch: 4.05\n";

struct fixture {
	struct gp_diag diag;
	struct gp_design *design;
	struct gp_build *build;
	char path[512];
};

static const char *tmp_dir(void)
{
	const char *dir = getenv("GP_TEST_TMP");
	return dir ? dir : "/tmp";
}

static void load(struct fixture *f, const char *text, const char *name)
{
	gp_diag_init(&f->diag);
	f->design = gp_design_load_buffer("test.yaml", text, strlen(text), NULL,
					  0, &f->diag);
	if (!f->design)
		fail_msg("%s", f->diag.count ? f->diag.entries[0].message : "?");
	f->build = gp_build_create(f->design, &f->diag);
	assert_non_null(f->build);
	snprintf(f->path, sizeof(f->path), "%s/test-proof-%s.pdf", tmp_dir(),
		 name);
}

static void unload(struct fixture *f)
{
	gp_build_destroy(f->build);
	gp_design_destroy(f->design);
	gp_diag_finish(&f->diag);
	remove(f->path);
}

static void write_proof(struct fixture *f, struct gp_buffer *out)
{
	gp_buffer_init(out);
	if (!gp_proof_write(out, f->build, &f->diag))
		fail_msg("%s", f->diag.count ? f->diag.entries[0].message : "?");
	FILE *file = fopen(f->path, "wb");
	assert_non_null(file);
	assert_int_equal(fwrite(out->data, 1, out->size, file), out->size);
	assert_int_equal(fclose(file), 0);
}

/* Output of a command, NUL-terminated; the caller frees it. */
static char *run(const char *format, ...)
	__attribute__((format(printf, 1, 2)));
static char *run(const char *format, ...)
{
	char command[1024];
	va_list args;
	va_start(args, format);
	vsnprintf(command, sizeof(command), format, args);
	va_end(args);
	FILE *pipe = popen(command, "r");
	assert_non_null(pipe);
	size_t size = 0, capacity = 65536;
	char *text = malloc(capacity);
	assert_non_null(text);
	size_t n;
	while ((n = fread(text + size, 1, capacity - size - 1, pipe)) > 0) {
		size += n;
		if (capacity - size < 4096) {
			capacity *= 2;
			text = realloc(text, capacity);
			assert_non_null(text);
		}
	}
	text[size] = '\0';
	if (pclose(pipe) != 0)
		fail_msg("command failed: %s", command);
	return text;
}

/* b follows a within a few lines of pdftotext -layout output: a
 * dimension's label and value are separate words when the value sits
 * between the arrows and the label before them. */
static bool follows(const char *text, const char *a, const char *b)
{
	for (const char *s = text; (s = strstr(s, a)); s++) {
		const char *t = strstr(s + strlen(a), b);
		if (t && t - s < 400)
			return true;
	}
	return false;
}

/* ...in either order (the label may follow the value). */
static bool near(const char *text, const char *a, const char *b)
{
	return follows(text, a, b) || follows(text, b, a);
}

/* pdfinfo: pages and the size of every page, against the paper the plan
 * chose (A4 is 210 x 297 mm, ISO 216 = 595.276 x 841.89 pt). */
static void test_pages(void **state)
{
	struct fixture f;
	struct gp_buffer out;
	load(&f, sample, "pages");
	write_proof(&f, &out);
	struct gp_proof_plan plan;
	gp_proof_plan(f.build, &plan);
	assert_string_equal(plan.paper_name, "A4");
	assert_true(plan.landscape);
	assert_int_equal(plan.scale_den, 1);

	char *info = run("pdfinfo '%s'", f.path);
	char expect[64];
	snprintf(expect, sizeof(expect), "Pages:           %d\n",
		 plan.sheet_count);
	assert_non_null(strstr(info, expect));
	free(info);
	info = run("pdfinfo -f 1 -l %d '%s'", plan.sheet_count, f.path);
	int sizes = 0;
	for (const char *s = info; (s = strstr(s, "\nPage ")); s++) {
		double w, h;
		int page;
		if (sscanf(s, "\nPage %d size: %lf x %lf", &page, &w, &h) != 3)
			continue;       /* "Page N rot:" */
		assert_int_equal(page, sizes + 1);
		assert_true(fabs(w - 841.89) < 0.01);   /* A4 landscape */
		assert_true(fabs(h - 595.276) < 0.01);
		sizes++;
	}
	assert_int_equal(sizes, plan.sheet_count);
	free(info);
	gp_buffer_finish(&out);
	unload(&f);
}

/* pdftotext: the reviewer can read the part, revision, span with its
 * tolerance, the pitch as a reference, and every net of the pin table. */
static void test_text(void **state)
{
	struct fixture f;
	struct gp_buffer out;
	load(&f, sample, "text");
	write_proof(&f, &out);
	char *text = run("pdftotext -layout '%s' -", f.path);
	assert_non_null(strstr(text, "PRF-012"));
	assert_non_null(strstr(text, "2031-04-05"));
	/* 11 pitches of 4.05 = 44.55, tolerance from the description */
	assert_non_null(strstr(text, "44.55 \xc2\xb1" "0.03"));
	assert_true(near(text, "cell pitch", "(4.05)"));
	assert_true(near(text, "front plate", "60 \xc2\xb1" "0.2"));
	assert_true(near(text, "ledge", "6"));
	assert_non_null(strstr(text, "Cautions"));
	assert_non_null(strstr(text, "safety data sheets"));
	free(text);

	/* revision on the title block of sheet 1 */
	text = run("pdftotext -f 1 -l 1 '%s' -", f.path);
	assert_non_null(strstr(text, "Revision\nC") ?
				strstr(text, "Revision\nC") :
				strstr(text, "\nC\n"));
	free(text);

	/* every net in the pin table sheets */
	struct gp_proof_plan plan;
	gp_proof_plan(f.build, &plan);
	text = run("pdftotext -layout -f %d -l %d '%s' -", plan.sheet_pins,
		   plan.sheet_pins + plan.pin_sheets - 1, f.path);
	const struct gp_artwork *art = &f.build->art;
	assert_int_equal(art->net_count, 5 + 36);
	for (size_t i = 0; i < art->net_count; i++) {
		char word[40];
		snprintf(word, sizeof(word), " %s ", art->nets[i].name);
		if (!strstr(text, word))
			fail_msg("net %s not in the pin table",
				 art->nets[i].name);
	}
	free(text);
	gp_buffer_finish(&out);
	unload(&f);
}

static bool contains(const char *data, size_t size, const char *word)
{
	size_t n = strlen(word);
	for (size_t i = 0; i + n <= size; i++)
		if (memcmp(data + i, word, n) == 0)
			return true;
	return false;
}

static void load_file(struct fixture *f, const char *file, const char *name)
{
	FILE *in = fopen(file, "rb");
	assert_non_null(in);
	static char text[65536];
	size_t n = fread(text, 1, sizeof(text) - 1, in);
	fclose(in);
	text[n] = '\0';
	load(f, text, name);
}

/* The words of one line (space separated, in order) appear in this order
 * on one line of the text. */
static bool words_in_text(const char *text, const char *words)
{
	for (const char *line = text; line && *line;) {
		const char *end = strchr(line, '\n');
		size_t length = end ? (size_t)(end - line) : strlen(line);
		char copy[2048], want[2048];
		snprintf(copy, sizeof(copy), "%.*s", (int)length, line);
		snprintf(want, sizeof(want), "%s", words);
		char *save_line = NULL, *save_want = NULL;
		char *word = strtok_r(copy, " ", &save_line);
		char *next = strtok_r(want, " ", &save_want);
		bool started = false;
		while (word && next) {
			if (strcmp(word, next) == 0) {
				next = strtok_r(NULL, " ", &save_want);
				started = true;
			} else if (started) {
				break;
			}
			word = strtok_r(NULL, " ", &save_line);
		}
		if (!next)
			return true;
		line = end ? end + 1 : NULL;
	}
	return false;
}

/* The routed sample: every row of the pin matrix is on its sheets, the pad
 * pitch and span are dimensioned, and the glass thickness comes from
 * the optics section. */
static void test_routed_sample(void **state)
{
	struct fixture f;
	struct gp_buffer out;
	load_file(&f, "../samples/panel-2x16.yaml", "routed");
	assert_true(f.build->pin_count > 0);
	write_proof(&f, &out);
	struct gp_proof_plan plan;
	gp_proof_plan(f.build, &plan);
	char *text = run("pdftotext -layout -f %d -l %d '%s' -",
			 plan.sheet_pins, plan.sheet_pins + plan.pin_sheets - 1,
			 f.path);
	/* the bands of commons as the sheets state them: in order, each
	 * following the last, covering all 16 */
	size_t band_first[16], band_last[16], bands = 0;
	for (const char *at = text; (at = strstr(at, "crosses COM"));) {
		unsigned a, b;
		at += strlen("crosses ");
		assert_int_equal(sscanf(at, "COM%u to COM%u", &a, &b), 2);
		if (bands && band_first[bands - 1] == a)
			continue;
		assert_true(bands < 16);
		assert_int_equal(a, bands ? band_last[bands - 1] + 1 : 1);
		band_first[bands] = a;
		band_last[bands++] = b;
	}
	assert_true(bands > 0);
	assert_int_equal(band_last[bands - 1], 16);
	/* every row of the pin matrix (pin-matrix.csv) is on the sheets, in
	 * each band where it has something (a row with nothing anywhere in
	 * the first) */
	struct gp_pin_matrix m;
	assert_true(gp_pin_matrix_init(&m, f.build));
	assert_int_equal(m.rows, f.build->pin_count);
	assert_int_equal(m.commons, 16);
	for (size_t r = 0; r < m.rows; r++) {
		char words[2048];
		const struct gp_pin *pin = m.pins[r];
		bool anything = false;
		for (size_t k = 0; k < 16; k++)
			anything = anything || *gp_pin_matrix_cell(&m, r, k);
		for (size_t band = 0; band < bands; band++) {
			size_t used = (size_t)snprintf(
				words, sizeof(words), "%d %s", pin->number,
				pin->net >= 0 ? f.build->art.nets[pin->net].name
					      : "NC");
			bool here = !anything && band == 0;
			for (size_t k = band_first[band] - 1;
			     k < band_last[band]; k++)
				if (*gp_pin_matrix_cell(&m, r, k)) {
					here = true;
					used += (size_t)snprintf(
						words + used,
						sizeof(words) - used, " %s",
						gp_pin_matrix_cell(&m, r, k));
				}
			if (here && !words_in_text(text, words))
				fail_msg("pin matrix row not on the sheets: "
					 "%.60s", words);
		}
	}
	gp_pin_matrix_finish(&m);
	free(text);

	text = run("pdftotext -layout -f 1 -l 1 '%s' -", f.path);
	assert_non_null(strstr(text, "GPX-216"));
	/* 16 cells at 3.15: 15 x 3.15 = 47.25 from the first to the last */
	assert_non_null(strstr(text, "47.25 \xc2\xb1" "0.02"));
	assert_true(near(text, "pad pitch", "(0.65)"));
	/* 96 pads at 0.65: 95 x 0.65 = 61.75 */
	assert_true(near(text, "pads 1-96:", "61.75 \xc2\xb1" "0.02"));
	assert_non_null(strstr(text, "0.7 mm"));
	free(text);
	gp_buffer_finish(&out);
	unload(&f);
}

/* Detail views: the first icon and the first digit at 10:1 (ISO 5455
 * enlargement) with their sizes; absent parts are said to be absent. */
static void test_details(void **state)
{
	struct fixture f;
	struct gp_buffer out;
	struct gp_proof_plan plan;
	load_file(&f, "../samples/tank-logger.yaml", "icons");
	write_proof(&f, &out);
	gp_proof_plan(f.build, &plan);
	char *text = run("pdftotext -f %d -l %d '%s' -", plan.sheet_details,
			 plan.sheet_details + plan.detail_sheets - 1, f.path);
	assert_non_null(strstr(text, "Icon '"));
	assert_non_null(strstr(text, "One dot-matrix cell"));
	assert_non_null(strstr(text, "scale 10:1"));
	assert_non_null(strstr(text, "no digits in this design"));
	/* the cell of block 'reading': 5 dots at 0.5 pitch, 0.45 wide */
	assert_non_null(strstr(text, "cell 2.45"));
	free(text);
	gp_buffer_finish(&out);
	unload(&f);

	load_file(&f, "../samples/timer-4digit-quarter.yaml", "digits");
	write_proof(&f, &out);
	gp_proof_plan(f.build, &plan);
	text = run("pdftotext -f %d -l %d '%s' -", plan.sheet_details,
		   plan.sheet_details + plan.detail_sheets - 1, f.path);
	assert_non_null(strstr(text, "Digit of row 'clock'"));
	assert_non_null(strstr(text, "no icons in this design"));
	free(text);
	text = run("pdftotext -layout -f 1 -l 1 '%s' -", f.path);
	assert_true(near(text, "digit pitch", "(9)"));
	free(text);
	gp_buffer_finish(&out);
	unload(&f);
}

/* Centre (mm from the top-left corner) of the word on page whose text
 * is word and which lies nearest to (x, y) mm; returns the distance. */
static double nearest_word(const char *pdf, int page, const char *word,
			   double x, double y, double *cx, double *cy)
{
	char *text = run("pdftotext -bbox -f %d -l %d '%s' -", page, page,
			 pdf);
	double best = INFINITY;
	char tail[64];
	snprintf(tail, sizeof(tail), "\">%s</word>", word);
	for (const char *s = text; (s = strstr(s, "<word ")); s++) {
		double x0, y0, x1, y1;
		const char *end = strstr(s, "</word>");
		const char *close = strstr(s, "\">");
		if (!end || !close || strncmp(close, tail, strlen(tail)) != 0)
			continue;
		if (sscanf(s, "<word xMin=\"%lf\" yMin=\"%lf\" xMax=\"%lf\" "
			      "yMax=\"%lf\"", &x0, &y0, &x1, &y1) != 4)
			continue;
		/* points to mm */
		double mx = (x0 + x1) / 2 * 25.4 / 72, my = (y0 + y1) / 2 * 25.4 / 72;
		double d = hypot(mx - x, my - y);
		if (d < best) {
			best = d;
			*cx = mx;
			*cy = my;
		}
	}
	free(text);
	return best;
}

/* A planted defect (tests/checks: the common strip comes within 0.45 mm
 * of the back plate's edge, the rule's limit being 0.5 mm) has its
 * finding's number printed where the finding is, found with pdftotext
 * -bbox; a clean glass says so. */
static void test_findings(void **state)
{
	struct fixture f;
	struct gp_buffer out;
	struct gp_proof_plan plan;
	load_file(&f, "checks/edge.yaml", "edge");
	assert_true(f.build->checked);
	assert_int_equal(f.build->checks.count, 1);
	const struct gp_finding *finding = &f.build->checks.findings[0];
	write_proof(&f, &out);
	gp_proof_plan(f.build, &plan);
	double x = plan.ox + plan.scale * (double)finding->place.x / 1e6;
	double y = plan.oy - plan.scale * (double)finding->place.y / 1e6;
	double cx = 0, cy = 0;
	double d = nearest_word(f.path, plan.sheet_findings, "1", x, y, &cx,
				&cy);
	if (d > 0.3)
		fail_msg("finding 1 is marked at (%.2f, %.2f) mm, expected "
			 "(%.2f, %.2f)", cx, cy, x, y);
	/* and listed with rule, net, value and limit */
	char *text = run("pdftotext -layout -f %d -l %d '%s' -",
			 plan.sheet_findings, plan.sheet_findings +
			 plan.finding_sheets - 1, f.path);
	assert_non_null(strstr(text, "1 finding (1 error, 0 warnings)"));
	assert_non_null(strstr(text, "edge-clearance"));
	assert_non_null(strstr(text, "0.45 mm"));
	assert_non_null(strstr(text, "0.5 mm"));
	free(text);
	gp_buffer_finish(&out);
	unload(&f);

	load_file(&f, "checks/clean.yaml", "clean");
	assert_int_equal(f.build->checks.count, 0);
	write_proof(&f, &out);
	gp_proof_plan(f.build, &plan);
	assert_int_equal(plan.finding_sheets, 1);
	text = run("pdftotext -f %d -l %d '%s' -", plan.sheet_findings,
		   plan.sheet_findings, f.path);
	assert_non_null(strstr(text, "No findings: every check passed."));
	free(text);
	gp_buffer_finish(&out);
	unload(&f);
}

/* Two runs give the same bytes; no date unless SOURCE_DATE_EPOCH (which
 * the tool hands to the build). */
static void test_deterministic(void **state)
{
	struct fixture f;
	struct gp_buffer a, b;
	load(&f, sample, "same");
	write_proof(&f, &a);
	write_proof(&f, &b);
	assert_int_equal(a.size, b.size);
	assert_memory_equal(a.data, b.data, a.size);
	assert_false(contains(a.data, a.size, "CreationDate"));
	gp_buffer_finish(&a);
	gp_buffer_finish(&b);

	/* 1700000000 s is 2023-11-14 22:13:20 UTC */
	gp_build_set_epoch(f.build, 1700000000);
	write_proof(&f, &a);
	char *info = run("pdfinfo '%s'", f.path);
	assert_non_null(strstr(info, "CreationDate:    Tue Nov 14 22:13:20 "
				     "2023 UTC"));
	assert_non_null(strstr(info, "Creator:         glassplot"));
	assert_non_null(strstr(info, "Title:           PRF-012 revision C"));
	free(info);
	gp_buffer_finish(&a);
	unload(&f);
}

/* --- scale, measured on the rendered sheet ---------------------------------- */

struct image {
	int w, h;
	unsigned char *pixels;    /* grey, 0 black .. 255 white */
};

static void render(const char *pdf, int page, int dpi, struct image *image)
{
	char base[600], path[640], command[1400];
	snprintf(base, sizeof(base), "%s-p%d", pdf, page);
	snprintf(command, sizeof(command),
		 "pdftoppm -r %d -f %d -l %d -gray -singlefile '%s' '%s'", dpi,
		 page, page, pdf, base);
	assert_int_equal(system(command), 0);
	snprintf(path, sizeof(path), "%s.pgm", base);
	FILE *file = fopen(path, "rb");
	assert_non_null(file);
	int max;
	assert_int_equal(fscanf(file, "P5 %d %d %d", &image->w, &image->h,
				&max), 3);
	fgetc(file);
	size_t n = (size_t)image->w * (size_t)image->h;
	image->pixels = malloc(n);
	assert_non_null(image->pixels);
	assert_int_equal(fread(image->pixels, 1, n, file), n);
	fclose(file);
	remove(path);
}

/* Starts and ends (exclusive) of runs darker than threshold along row y
 * between x0 and x1; returns the count. */
static int runs(const struct image *image, int y, int x0, int x1,
		int threshold, int *starts, int *ends, int max)
{
	int n = 0;
	bool in = false;
	for (int x = x0; x < x1; x++) {
		bool dark = image->pixels[(size_t)y * image->w + x] < threshold;
		if (dark && !in && n < max)
			starts[n] = x;
		if (!dark && in && n < max)
			ends[n++] = x;
		in = dark;
	}
	if (in && n < max)
		ends[n++] = x1;
	return n;
}

#define DPI 600
static double px(double mm)
{
	return mm / 25.4 * DPI;
}

static void test_scale(void **state)
{
	struct fixture f;
	struct gp_buffer out;
	load(&f, sample, "scale");
	write_proof(&f, &out);
	struct gp_proof_plan plan;
	gp_proof_plan(f.build, &plan);
	struct image image;
	render(f.path, plan.sheet_overview, DPI, &image);

	/* Between the first and second dot rows only the front plate's
	 * segment strips (dot columns) are drawn: 12 cells x 3 columns. */
	double y_mm = 22 - 0.9 - 0.1;        /* in the 0.2 mm gap */
	int y = (int)lround(px(plan.oy - plan.scale * y_mm));
	int x0 = (int)px(plan.ox + plan.scale * 6.0);
	int x1 = (int)px(plan.ox + plan.scale * (6.5 + 11 * 4.05 + 3)) + 1;
	int starts[64], ends[64];
	int n = runs(&image, y, x0, x1, 235, starts, ends, 64);
	assert_int_equal(n, 36);
	/* described span: 11 x 4.05 = 44.55 mm, to within one pixel */
	double measured = starts[33] - starts[0];
	double expected = px(44.55);
	if (fabs(measured - expected) > 1.0)
		fail_msg("span %.1f px, expected %.1f px", measured, expected);

	/* the ruler: ticks 0, 50 and 100 reach below its baseline */
	y = (int)lround(px(plan.ruler_y + 1.5));
	n = runs(&image, y, (int)px(plan.ruler_x - 3),
		 (int)px(plan.ruler_x + 103), 128, starts, ends, 64);
	assert_int_equal(n, 3);
	double first = (starts[0] + ends[0]) / 2.0;
	double last = (starts[2] + ends[2]) / 2.0;
	if (fabs(last - first - px(100)) > 1.0)
		fail_msg("ruler %.1f px, expected %.1f px", last - first,
			 px(100));
	free(image.pixels);
	gp_buffer_finish(&out);
	unload(&f);
}

/* --- paper choice ---------------------------------------------------------- */

static void plan_of(const char *extra, double width, double height,
		    struct gp_proof_plan *plan)
{
	char text[1024];
	snprintf(text, sizeof(text),
		 "glass: {part: PRF-900}\n"
		 "front: {size: [%g, %g]}\n"
		 "back: {size: [%g, %g], position: [0, 5]}\n"
		 "viewing_area: {position: [5, 10], size: [%g, %g]}\n%s",
		 width, height, width, height - 5, width - 10, height - 20,
		 extra);
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_design *design = gp_design_load_buffer(
		"plan.yaml", text, strlen(text), NULL, 0, &diag);
	if (!design)
		fail_msg("%s", diag.count ? diag.entries[0].message : "?");
	struct gp_build *build = gp_build_create(design, &diag);
	assert_non_null(build);
	gp_proof_plan(build, plan);
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_finish(&diag);
}

static void test_paper(void **state)
{
	struct gp_proof_plan plan;
	/* small glass: A4 at 1:1 */
	plan_of("", 66, 30, &plan);
	assert_string_equal(plan.paper_name, "A4");
	assert_int_equal(plan.scale_den, 1);
	/* US sizes when asked for */
	plan_of("proof: {series: us}\n", 66, 30, &plan);
	assert_string_equal(plan.paper_name, "Letter");
	/* forced portrait */
	plan_of("proof: {orientation: portrait}\n", 66, 30, &plan);
	assert_false(plan.landscape);
	assert_true(plan.paper_w < plan.paper_h);
	/* a wider glass needs a larger sheet, still 1:1 */
	plan_of("", 300, 120, &plan);
	assert_string_equal(plan.paper_name, "A3");
	assert_true(plan.landscape);
	assert_int_equal(plan.scale_den, 1);
	/* forced to A4: too large at 1:1, so reduced (ISO 5455 scale) */
	plan_of("proof: {paper: a4}\n", 300, 120, &plan);
	assert_string_equal(plan.paper_name, "A4");
	assert_int_equal(plan.scale_den, 2);
	/* larger than A0 at 1:1: the smallest sheet that takes it at 1:2 */
	plan_of("", 1500, 900, &plan);
	assert_string_equal(plan.paper_name, "A1");
	assert_int_equal(plan.scale_den, 2);
	/* the glass lies inside the sheet */
	assert_true(plan.ox + 1500 * plan.scale < plan.paper_w);
	assert_true(plan.oy - 900 * plan.scale > 0);
}

/* The scale stated on a reduced sheet. */
static void test_reduced_scale_stated(void **state)
{
	struct fixture f;
	struct gp_buffer out;
	load(&f,
	     "glass: {part: PRF-901}\n"
	     "front: {size: [300, 120]}\n"
	     "back: {size: [300, 115], position: [0, 5]}\n"
	     "viewing_area: {position: [5, 10], size: [290, 100]}\n"
	     "proof: {paper: a4, orientation: landscape}\n",
	     "reduced");
	write_proof(&f, &out);
	char *text = run("pdftotext -f 1 -l 1 '%s' -", f.path);
	assert_non_null(strstr(text, "1:2"));
	free(text);
	gp_buffer_finish(&out);
	unload(&f);
}

/* --- legend colours for a colour-blind reader ------------------------------ */

/* Simulated dichromat vision: the matrices of Machado, Oliveira and
 * Fernandes, "A physiologically-based model for simulation of color vision
 * deficiency", IEEE TVCG 2009, severity 1.0, on linear RGB (from memory). */
static const double protanopia[3][3] = {
	{ 0.152286, 1.052583, -0.204868 },
	{ 0.114503, 0.786281, 0.099216 },
	{ -0.003882, -0.048116, 1.051998 },
};
static const double deuteranopia[3][3] = {
	{ 0.367322, 0.860646, -0.227968 },
	{ 0.280085, 0.672501, 0.047413 },
	{ -0.011820, 0.042940, 0.968881 },
};
static const double normal_vision[3][3] = {
	{ 1, 0, 0 }, { 0, 1, 0 }, { 0, 0, 1 }
};

/* sRGB decoding (IEC 61966-2-1) */
static double linear(double c)
{
	return c <= 0.04045 ? c / 12.92 : pow((c + 0.055) / 1.055, 2.4);
}

static double lab_f(double t)
{
	return t > 216.0 / 24389 ? cbrt(t) : (24389.0 / 27 * t + 16) / 116;
}

/* CIELAB (D65 white) of colour c painted with alpha over white paper, as
 * seen through matrix m. */
static void seen(struct rgb c, double alpha, const double m[3][3],
		 double lab[3])
{
	double in[3] = { linear(alpha * c.r + 1 - alpha),
			 linear(alpha * c.g + 1 - alpha),
			 linear(alpha * c.b + 1 - alpha) };
	double rgb[3];
	for (int i = 0; i < 3; i++) {
		rgb[i] = m[i][0] * in[0] + m[i][1] * in[1] + m[i][2] * in[2];
		rgb[i] = rgb[i] < 0 ? 0 : rgb[i] > 1 ? 1 : rgb[i];
	}
	/* sRGB to XYZ (IEC 61966-2-1), white D65 */
	double x = 0.4124 * rgb[0] + 0.3576 * rgb[1] + 0.1805 * rgb[2];
	double y = 0.2126 * rgb[0] + 0.7152 * rgb[1] + 0.0722 * rgb[2];
	double z = 0.0193 * rgb[0] + 0.1192 * rgb[1] + 0.9505 * rgb[2];
	double fx = lab_f(x / 0.95047), fy = lab_f(y), fz = lab_f(z / 1.08883);
	lab[0] = 116 * fy - 16;
	lab[1] = 500 * (fx - fy);
	lab[2] = 200 * (fy - fz);
}

static double colour_distance(const struct proof_legend_item *a,
			      const struct proof_legend_item *b,
			      const double m[3][3])
{
	double la[3], lb[3];
	seen(a->colour, a->alpha, m, la);
	seen(b->colour, b->alpha, m, lb);
	return sqrt((la[0] - lb[0]) * (la[0] - lb[0]) +
		    (la[1] - lb[1]) * (la[1] - lb[1]) +
		    (la[2] - lb[2]) * (la[2] - lb[2]));
}

/* Every two legend items differ: by their swatch (line style) when they
 * share a colour, else by a colour difference of at least 20 CIELAB
 * units for normal, protanope and deuteranope vision alike (20: clearly
 * distinct at a glance, common practice, no published source; the just
 * noticeable difference is about 2.3, Sharma 2003).  The finding colour
 * is held against them too. */
static void test_legend_colours(void **state)
{
	const struct proof_legend_item finding = { "finding",
						   proof_finding_colour, 1.0,
						   SWATCH_FILL };
	int n = proof_overview_legend_count;
	const double (*visions[3])[3] = { normal_vision, protanopia,
					  deuteranopia };
	for (int i = 0; i <= n; i++)
		for (int k = i + 1; k <= n; k++) {
			const struct proof_legend_item *a =
				&proof_overview_legend[i];
			const struct proof_legend_item *b =
				k == n ? &finding : &proof_overview_legend[k];
			if (colour_distance(a, b, normal_vision) < 1) {
				assert_int_not_equal(a->swatch, b->swatch);
				continue;
			}
			for (int v = 0; v < 3; v++)
				if (colour_distance(a, b, visions[v]) < 20)
					fail_msg("'%s' and '%s' look alike "
						 "(vision %d)",
						 a->label, b->label, v);
		}
	/* the check can fail: the old transfer and viewing-area purples */
	const struct proof_legend_item purple1 = { "a", { 0.55, 0.05, 0.55 },
						   1.0, SWATCH_FILL };
	const struct proof_legend_item purple2 = { "b", { 0.45, 0.20, 0.70 },
						   1.0, SWATCH_FILL };
	assert_true(colour_distance(&purple1, &purple2, protanopia) < 20);
}

/* --- the overprint checker can fail ------------------------------------------ */

static void checker_sheet(const char *path, int defect)
{
	cairo_surface_t *surface = cairo_pdf_surface_create(path, 595, 842);
	cairo_t *cr = cairo_create(surface);
	/* through FreeType, as the proof sets its text: cairo 1.16's toy
	 * font lookup leaks inside fontconfig */
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_font *font = gp_font_open("Liberation Sans", NULL, NULL,
					    &diag);
	gp_diag_finish(&diag);
	assert_non_null(font);
	FT_Library library;
	FT_Face ft_face;
	assert_int_equal(FT_Init_FreeType(&library), 0);
	assert_int_equal(FT_New_Face(library, gp_font_file(font),
				     gp_font_face_index(font), &ft_face), 0);
	gp_font_destroy(font);
	cairo_font_face_t *face =
		cairo_ft_font_face_create_for_ft_face(ft_face, 0);
	cairo_set_font_face(cr, face);
	cairo_set_font_size(cr, 12);   /* cap height 0.688 x 12 pt = 2.9 mm */
	cairo_move_to(cr, 100, 100);
	cairo_show_text(cr, "first");
	cairo_move_to(cr, defect == 0 ? 110 : 300, defect == 0 ? 104 : 300);
	cairo_show_text(cr, "second");
	if (defect == 1) {
		cairo_move_to(cr, 90, 96);
		cairo_line_to(cr, 160, 96);
		cairo_stroke(cr);
	}
	if (defect == 2) {
		cairo_set_font_size(cr, 6);
		cairo_move_to(cr, 100, 400);
		cairo_show_text(cr, "small");
	}
	cairo_destroy(cr);
	cairo_surface_finish(surface);
	cairo_surface_destroy(surface);
	cairo_font_face_destroy(face);
	FT_Done_Face(ft_face);
	FT_Done_FreeType(library);
}

/* check-proof-text.py finds words set over each other, a line through a
 * word and lettering under 2.5 mm, and passes a clean sheet. */
static void test_overprint_checker(void **state)
{
	static const char *const expected[] = { "overlaps", "crosses",
						"lettering" };
	char path[512];
	for (int defect = -1; defect < 3; defect++) {
		snprintf(path, sizeof(path), "%s/checker-%d.pdf", tmp_dir(),
			 defect + 1);
		checker_sheet(path, defect);
		char command[1024];
		snprintf(command, sizeof(command),
			 "python3 check-proof-text.py '%s'", path);
		FILE *pipe = popen(command, "r");
		assert_non_null(pipe);
		char out[4096] = "";
		size_t n = fread(out, 1, sizeof(out) - 1, pipe);
		out[n] = '\0';
		int status = pclose(pipe);
		if (defect < 0) {
			assert_int_equal(status, 0);
		} else {
			assert_int_not_equal(status, 0);
			if (!strstr(out, expected[defect]))
				fail_msg("defect %d not found: %s", defect,
					 out);
		}
	}
}

/* --- previews of content ------------------------------------------------------- */

/* The element table of glass-map.h: one line per digit segment or icon,
 * "{ kind, owner, a, b, common, segment, "NAME" }" with the name of
 * pin-matrix.csv ("2B", "COL", an icon's name). */
struct map_element {
	int common, segment;
	char label[96];
};

static size_t read_map(const struct gp_build *build, struct map_element *out,
		       size_t max)
{
	struct gp_buffer header;
	gp_buffer_init(&header);
	assert_true(gp_firmware_header(build, &header));
	assert_true(gp_buffer_append(&header, "", 1));
	size_t n = 0;
	for (const char *s = header.data; (s = strstr(s, "\t\t{ ")) && n < max;
	     s++) {
		int kind, owner, a, b;
		struct map_element *e = &out[n];
		if (sscanf(s, "\t\t{ %d, %d, %d, %d, %d, %d, \"%95[^\"]\"",
			   &kind, &owner, &a, &b, &e->common, &e->segment,
			   e->label) != 7)
			continue;
		n++;
	}
	gp_buffer_finish(&header);
	return n;
}

/* A point inside a convex part: the mean of its corners. */
static void inside(const struct gp_polygon *poly, double *x, double *y)
{
	*x = *y = 0;
	for (size_t i = 0; i < poly->outer.count; i++) {
		*x += gp_mm(poly->outer.points[i].x);
		*y += gp_mm(poly->outer.points[i].y);
	}
	*x /= (double)poly->outer.count;
	*y /= (double)poly->outer.count;
}

struct png_read {
	const unsigned char *data;
	size_t size, at;
};

static cairo_status_t read_png(void *closure, unsigned char *data,
			       unsigned int length)
{
	struct png_read *r = closure;
	if (r->at + length > r->size)
		return CAIRO_STATUS_READ_ERROR;
	memcpy(data, r->data + r->at, length);
	r->at += length;
	return CAIRO_STATUS_SUCCESS;
}

/* Dark at glass point (x, y) mm of a preview PNG at dpi? */
static bool dark_at(cairo_surface_t *image, struct gp_box g, double dpi,
		    double x, double y)
{
	double s = dpi / 25.4;
	int px = (int)(s * (x - gp_mm(g.x0)));
	int py = (int)(s * (gp_mm(g.y1) - y));
	int stride = cairo_image_surface_get_stride(image);
	const unsigned char *row =
		cairo_image_surface_get_data(image) + py * stride;
	uint32_t v = ((const uint32_t *)row)[px];
	int grey = (int)((v >> 16 & 255) + (v >> 8 & 255) + (v & 255)) / 3;
	return grey < 100;
}

/* "clock=12:34" on the static timer: the digits' segments by the usual
 * seven-segment forms (1: b c; 2: a b d e g; 3: a b c d g; 4: b c f g)
 * and the colon after digit 2, looked up by their names in the firmware
 * map glass-map.h; the preview PNG is dark exactly on the pixels whose
 * (common, segment) pairs those are. */
static void test_show_digits(void **state)
{
	struct fixture f;
	load_file(&f, "../samples/timer-4digit-static.yaml", "show");
	assert_true(gp_build_show(f.build, "clock=12:34", &f.diag));
	static struct map_element map[512];
	size_t n = read_map(f.build, map, 512);
	static const char *const lit[4] = { "BC", "ABDEG", "ABCDG", "BCFG" };
	int driven[64][2];
	size_t count = 0;
	for (size_t i = 0; i < n; i++) {
		int digit;
		char part[16];
		bool on = strcmp(map[i].label, "COL") == 0;
		if (sscanf(map[i].label, "%d%15s", &digit, part) == 2)
			on = digit >= 1 && digit <= 4 && strlen(part) == 1 &&
			     strchr(lit[digit - 1], part[0]);
		if (on) {
			driven[count][0] = map[i].common;
			driven[count][1] = map[i].segment;
			count++;
		}
	}
	/* the colon is two pixels (its dots) on one pair */
	assert_int_equal(count, 2 + 5 + 2 + 5 + 4);

	struct gp_buffer png;
	gp_buffer_init(&png);
	const double dpi = 200;
	assert_true(gp_show_png(f.build, f.build->show, dpi, &png, &f.diag));
	struct png_read r = { (const unsigned char *)png.data, png.size, 0 };
	cairo_surface_t *image =
		cairo_image_surface_create_from_png_stream(read_png, &r);
	assert_int_equal(cairo_surface_status(image), CAIRO_STATUS_SUCCESS);
	cairo_surface_flush(image);
	const struct gp_artwork *art = &f.build->art;
	struct gp_box g = gp_box_union(f.design->front.box, f.design->back.box);
	size_t dark = 0;
	for (size_t i = 0; i < art->pixel_count; i++) {
		const struct gp_pixel *px = &art->pixels[i];
		int c = art->nets[px->common].number;
		int s = art->nets[px->segment].number;
		bool expected = false;
		for (size_t k = 0; k < count; k++)
			expected |= driven[k][0] == c && driven[k][1] == s;
		double x, y;
		inside(&px->shape, &x, &y);
		bool seen = dark_at(image, g, dpi, x, y);
		if (seen != expected)
			fail_msg("pixel %zu (COM%d, SEG%d) at (%.2f, %.2f) is "
				 "%s", i, c, s, x, y, seen ? "lit" : "dark");
		dark += seen;
	}
	assert_true(dark >= count);
	cairo_surface_destroy(image);
	gp_buffer_finish(&png);

	/* content the glass cannot show is an error naming it */
	assert_false(gp_build_show(f.build, "clock=12.34", &f.diag));
	assert_non_null(strstr(gp_diag_message(&f.diag, f.diag.count - 1),
			       "digit 2 of row 'clock' has no point"));
	assert_false(gp_build_show(f.build, "hours=12", &f.diag));
	assert_false(gp_build_show(f.build, "clock=12345", &f.diag));
	unload(&f);
}

/* Text in a dot matrix: "A" in the first cell of block 'reading' lights
 * exactly the dots FreeType's black-and-white rendering of Liberation
 * Mono's A sets (capitals over the rows above the last), at the pairs
 * the block's map gives (common of its dot row, segment of its column);
 * an icon by name lights its own pair. */
static void test_show_text(void **state)
{
	struct fixture f;
	load_file(&f, "../samples/tank-logger.yaml", "text");
	assert_true(gp_build_show(f.build, "reading=A;rec", &f.diag));
	const struct gp_block *b = &f.design->blocks[0];
	const struct gp_block_nets *nets = &f.build->blocks[0];
	/* FreeType, independently */
	FT_Library library;
	FT_Face face;
	assert_int_equal(FT_Init_FreeType(&library), 0);
	struct gp_font *font = gp_font_open("Liberation Mono", NULL, NULL,
					    &f.diag);
	assert_non_null(font);
	assert_int_equal(FT_New_Face(library, gp_font_file(font),
				     gp_font_face_index(font), &face), 0);
	gp_font_destroy(font);
	const TT_OS2 *os2 = FT_Get_Sfnt_Table(face, FT_SFNT_OS2);
	long caps = b->dots_down - 1;
	FT_UInt ppem = (FT_UInt)(caps * face->units_per_EM /
				 (double)os2->sCapHeight + 0.5);
	assert_int_equal(FT_Set_Pixel_Sizes(face, 0, ppem), 0);
	assert_int_equal(FT_Load_Char(face, 'A', FT_LOAD_RENDER |
					       FT_LOAD_TARGET_MONO), 0);
	const FT_Bitmap *bm = &face->glyph->bitmap;
	long top = caps - face->glyph->bitmap_top;
	long left = (b->dots_across - (long)bm->width) / 2;
	bool want[16][16] = { { false } };
	int wanted = 0;
	for (unsigned int y = 0; y < bm->rows; y++)
		for (unsigned int x = 0; x < bm->width; x++)
			if (bm->buffer[y * bm->pitch + x / 8] & (0x80 >> (x % 8))) {
				long r = top + (long)y, c = left + (long)x;
				if (r >= 0 && r < b->dots_down && c >= 0 &&
				    c < b->dots_across) {
					want[r][c] = true;
					wanted++;
				}
			}
	FT_Done_Face(face);
	FT_Done_FreeType(library);
	assert_true(wanted > 10);
	const struct gp_show *show = f.build->show;
	const struct gp_artwork *art = &f.build->art;
	int lit_dots = 0;
	for (size_t i = 0; i < art->pixel_count; i++) {
		const struct gp_pixel *px = &art->pixels[i];
		if (px->owner_kind == GP_OWNER_ICON) {
			bool rec = strcmp(f.design->icons[px->owner].name, "rec") == 0;
			if (show->lit[i] != rec)
				fail_msg("icon %s wrongly %s",
					 f.design->icons[px->owner].name,
					 show->lit[i] ? "lit" : "dark");
			continue;
		}
		if (px->owner_kind != GP_OWNER_BLOCK || px->owner != 0)
			continue;
		/* which dot of which cell, from the pairs of the map */
		int row = px->common - nets->first_common;
		int column = px->segment - nets->first_segment;
		int r = row % (int)b->dots_down, line = row / (int)b->dots_down;
		int cell = column / (int)b->dots_across;
		int c = column % (int)b->dots_across;
		bool expected = line == 0 && cell == 0 && want[r][c];
		if (show->lit[i] != expected)
			fail_msg("dot line %d cell %d row %d column %d is %s",
				 line, cell, r, c, show->lit[i] ? "lit" : "dark");
		lit_dots += show->lit[i];
	}
	assert_int_equal(lit_dots, wanted);
	unload(&f);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_pages),
		cmocka_unit_test(test_text),
		cmocka_unit_test(test_routed_sample),
		cmocka_unit_test(test_details),
		cmocka_unit_test(test_findings),
		cmocka_unit_test(test_deterministic),
		cmocka_unit_test(test_scale),
		cmocka_unit_test(test_paper),
		cmocka_unit_test(test_reduced_scale_stated),
		cmocka_unit_test(test_legend_colours),
		cmocka_unit_test(test_overprint_checker),
		cmocka_unit_test(test_show_digits),
		cmocka_unit_test(test_show_text),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
