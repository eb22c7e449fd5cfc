#include "gerbv-render.h"

#include <cairo.h>
#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/wait.h>
#include <unistd.h>

#define MM_PER_INCH 25.4

void gerbv_result_finish(struct gerbv_result *result)
{
	free(result->complaints);
	free(result->mask);
	memset(result, 0, sizeof(*result));
}

/* Runs argv with stdout to /dev/null and stderr to the file err_path. */
static bool run(char *const argv[], const char *err_path, char *err,
		size_t err_size)
{
	pid_t pid = fork();
	if (pid < 0) {
		snprintf(err, err_size, "fork: %s", strerror(errno));
		return false;
	}
	if (pid == 0) {
		int null = open("/dev/null", O_RDWR);
		int errfd = open(err_path, O_WRONLY | O_CREAT | O_TRUNC, 0644);
		if (null < 0 || errfd < 0)
			_exit(126);
		dup2(null, 0);
		dup2(null, 1);
		dup2(errfd, 2);
		execvp(argv[0], argv);
		_exit(127);
	}
	int status;
	while (waitpid(pid, &status, 0) < 0)
		if (errno != EINTR) {
			snprintf(err, err_size, "waitpid: %s", strerror(errno));
			return false;
		}
	if (!WIFEXITED(status) || WEXITSTATUS(status) >= 126) {
		snprintf(err, err_size, "%s did not run (status %d)", argv[0],
			 status);
		return false;
	}
	return true;
}

/* gerbv 2.9's note for an X2 attribute command, exactly:
 * "Unknown RS-274X extension found %T?% at line N in file \"PATH\""
 * with ? one of F, A, O, D, after its log prefix. */
bool gerbv_known_note(const char *line)
{
	static const char head[] = "Unknown RS-274X extension found %T";
	const char *p = strstr(line, head);
	if (!p)
		return false;
	p += sizeof(head) - 1;
	if (!*p || !strchr("FAOD", *p) || strncmp(p + 1, "% at line ", 10))
		return false;
	p += 11;
	if (*p < '0' || *p > '9')
		return false;
	while (*p >= '0' && *p <= '9')
		p++;
	if (strncmp(p, " in file \"", 10))
		return false;
	const char *close = strrchr(p + 10, '"');
	return close && strspn(close + 1, "\r\n") == strlen(close + 1);
}

/* Sorts gerbv's stderr into known notes and complaints. */
static bool read_complaints(const char *path, struct gerbv_result *result)
{
	FILE *f = fopen(path, "r");
	if (!f)
		return false;
	size_t size = 0, capacity = 256;
	char *text = malloc(capacity);
	char line[4096];
	if (!text) {
		fclose(f);
		return false;
	}
	text[0] = '\0';
	while (fgets(line, sizeof(line), f)) {
		if (strspn(line, " \t\r\n") == strlen(line))
			continue;
		if (gerbv_known_note(line)) {
			result->known_notes++;
			continue;
		}
		size_t n = strlen(line);
		if (size + n + 2 > capacity) {
			capacity = (size + n + 2) * 2;
			char *grown = realloc(text, capacity);
			if (!grown) {
				free(text);
				fclose(f);
				return false;
			}
			text = grown;
		}
		memcpy(text + size, line, n + 1);
		size += n;
	}
	fclose(f);
	result->complaints = text;
	return true;
}

static bool measure_png(const char *png, double left_mm, double top_mm,
			struct gerbv_result *r)
{
	cairo_surface_t *s = cairo_image_surface_create_from_png(png);
	if (cairo_surface_status(s) != CAIRO_STATUS_SUCCESS) {
		cairo_surface_destroy(s);
		return false;
	}
	cairo_surface_flush(s);
	int w = cairo_image_surface_get_width(s);
	int h = cairo_image_surface_get_height(s);
	int stride = cairo_image_surface_get_stride(s);
	const unsigned char *data = cairo_image_surface_get_data(s);
	int px0 = w, px1 = -1, py0 = h, py1 = -1;
	r->mask = calloc((size_t)w * (size_t)h + 1, 1);
	if (!r->mask) {
		cairo_surface_destroy(s);
		return false;
	}
	for (int y = 0; y < h; y++) {
		for (int x = 0; x < w; x++) {
			uint32_t p;
			memcpy(&p, data + (size_t)y * (size_t)stride +
					   4 * (size_t)x, 4);
			unsigned light = ((p >> 16) & 255) + ((p >> 8) & 255) +
					 (p & 255);
			if (light >= 3 * 128)
				continue;
			r->dark++;
			r->mask[(size_t)y * (size_t)w + (size_t)x] = 1;
			px0 = x < px0 ? x : px0;
			px1 = x > px1 ? x : px1;
			py0 = y < py0 ? y : py0;
			py1 = y > py1 ? y : py1;
		}
	}
	cairo_surface_destroy(s);
	r->width = w;
	r->height = h;
	r->left_mm = left_mm;
	r->top_mm = top_mm;
	r->area_mm2 = (double)r->dark * r->pixel_mm * r->pixel_mm;
	r->any_dark = r->dark > 0;
	if (r->any_dark) {
		/* pixel column x covers [x, x + 1); row y counts down from
		 * the top edge of the window */
		r->x0 = left_mm + px0 * r->pixel_mm;
		r->x1 = left_mm + (px1 + 1) * r->pixel_mm;
		r->y1 = top_mm - py0 * r->pixel_mm;
		r->y0 = top_mm - (py1 + 1) * r->pixel_mm;
		r->dark_on_border = px0 == 0 || py0 == 0 || px1 == w - 1 ||
				    py1 == h - 1;
	}
	return true;
}

bool gerbv_render(const char *gerbv, const char *gbr, const char *png,
		  const struct gerbv_frame *frame, struct gerbv_result *result,
		  char *err, size_t err_size)
{
	memset(result, 0, sizeof(*result));
	double dpi = frame->dpi;
	result->pixel_mm = MM_PER_INCH / dpi;
	/* window on whole pixels of the glass frame, so pixels map back */
	double ox = floor(frame->x0 / result->pixel_mm) - frame->margin_px;
	double oy = floor(frame->y0 / result->pixel_mm) - frame->margin_px;
	double ex = ceil(frame->x1 / result->pixel_mm) + frame->margin_px;
	double ey = ceil(frame->y1 / result->pixel_mm) + frame->margin_px;
	if (!(dpi > 0) || ex - ox > 30000 || ey - oy > 30000) {
		snprintf(err, err_size, "window too large or bad resolution");
		return false;
	}
	char dpi_arg[64], origin[128], window[64], err_path[4200];
	snprintf(dpi_arg, sizeof(dpi_arg), "--dpi=%.6g", dpi);
	/* gerbv 2.9 rejects an origin longer than 20 characters ("Specified
	 * origin is not recognized"): drop digits until it fits; at 4 digits
	 * the error is still far below a pixel at any dpi used here */
	for (int digits = 12; digits >= 4; digits--) {
		snprintf(origin, sizeof(origin), "--origin=%.*gx%.*g", digits,
			 ox / dpi, digits, oy / dpi);
		if (strlen(origin) <= strlen("--origin=") + 20)
			break;
	}
	snprintf(window, sizeof(window), "--window=%.0fx%.0f", ex - ox,
		 ey - oy);
	snprintf(err_path, sizeof(err_path), "%s.stderr", png);
	char *argv[] = {
		(char *)(gerbv ? gerbv : "gerbv"), "-x", "png", dpi_arg,
		"--border=0", origin, window, "--background=#ffffff",
		"--foreground=#000000ff", "-o", (char *)png, (char *)gbr, NULL,
	};
	unlink(png);
	if (!run(argv, err_path, err, err_size))
		return false;
	if (!read_complaints(err_path, result)) {
		snprintf(err, err_size, "cannot read %s", err_path);
		return false;
	}
	unlink(err_path);
	if (!measure_png(png, ox * result->pixel_mm, ey * result->pixel_mm,
			 result)) {
		snprintf(err, err_size, "gerbv wrote no readable PNG %s%s%s",
			 png, result->complaints[0] ? ": " : "",
			 result->complaints);
		gerbv_result_finish(result);
		return false;
	}
	return true;
}

bool gerbv_compare(const struct gerbv_result *r,
		   const struct gerbv_expect *e, char *why, size_t why_size)
{
	double px = r->pixel_mm;
	if (r->complaints && r->complaints[0]) {
		snprintf(why, why_size, "gerbv complained: %s", r->complaints);
		return false;
	}
	if (e->area_mm2 >= 0) {
		double tolerance = e->perimeter_mm * px + px * px;
		if (fabs(r->area_mm2 - e->area_mm2) > tolerance) {
			snprintf(why, why_size,
				 "dark area %.6f mm2, expected %.6f mm2 "
				 "+- %.6f (pixel %.6f mm)",
				 r->area_mm2, e->area_mm2, tolerance, px);
			return false;
		}
	}
	if (e->check_extent) {
		double t = 1.5 * px;
		if (!r->any_dark || r->dark_on_border ||
		    fabs(r->x0 - e->x0) > t || fabs(r->y0 - e->y0) > t ||
		    fabs(r->x1 - e->x1) > t || fabs(r->y1 - e->y1) > t) {
			snprintf(why, why_size,
				 "dark extent %.4f,%.4f..%.4f,%.4f mm%s, "
				 "expected %.4f,%.4f..%.4f,%.4f +- %.4f",
				 r->x0, r->y0, r->x1, r->y1,
				 r->dark_on_border ? " (touches the window)"
						   : "",
				 e->x0, e->y0, e->x1, e->y1, t);
			return false;
		}
	}
	return true;
}

bool gerbv_result_dark_at(const struct gerbv_result *r, double x, double y)
{
	double col = floor((x - r->left_mm) / r->pixel_mm);
	double row = floor((r->top_mm - y) / r->pixel_mm);
	if (!r->mask || col < 0 || row < 0 || col >= r->width ||
	    row >= r->height)
		return false;
	return r->mask[(size_t)row * (size_t)r->width + (size_t)col] != 0;
}
