/* Test helper: a strict reader for the Gerber files glassplot writes.
 *
 * It accepts only the subset of the Gerber Layer Format Specification
 * (Ucamco, revision 2024.05) that the writer uses, and rejects with the
 * section it breaks (numbers from memory) anything that is deprecated or
 * malformed there:
 *   3.3/3.4  every word ends with '*', extended commands between '%'
 *   4.1      G04 comments
 *   4.2.1    %MOMM*% once, before any coordinate
 *   4.2.2    %FSLAX46Y46*% once, before any coordinate (only LA is current)
 *   4.3      %ADDnn C/R apertures, nn >= 10, each defined once, before use
 *   4.6      Dnn selects a defined aperture (not inside a region)
 *   4.7      G01 before any D01
 *   4.8      X..Y..D01/D02/D03 with an explicit operation code (coordinate
 *            data without one is deprecated, 8.3), at most 4+6 digits
 *   4.9      %LPD*% only (the writer never uses clear polarity)
 *   4.10     G36/G37 regions: contours start with D02, are closed exactly,
 *            have no zero-length segment and no D03 / Dnn inside, and
 *            are valid (4.10.3, gr_contour_check)
 *   4.13     M02 last
 *   5.2-5.5  %TF file attributes (kept as text), %TA.AperFunction with a
 *            value of 5.6.10 (attached to apertures defined and regions
 *            made while it is set), %TO.N and %TO.P (attached to the
 *            objects made while set), %TD; none inside a region (5.4)
 *   5.6.9    .MD5 checked against the file
 *   5.6.14   .P only on flashes
 *   8        deprecated: G54/G55, G70/G71, G90/G91, G74, M00/M01, %IN, %IP,
 *            %AS, %IR, %MI, %OF, %SF, %LN, draws with rectangles
 * It also rejects zero-length draws, which the writer promises not to
 * produce.  Coordinates are read as integer nanometres (4.6 in mm). */
#ifndef GERBER_READ_H
#define GERBER_READ_H

#include "geom.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#define GR_VALUE_MAX 96

struct gr_aperture {
	int code;
	char kind;     /* 'C' circle (a = diameter) or 'R' (a x b) */
	int64_t a, b;  /* nm */
	char function[GR_VALUE_MAX]; /* .AperFunction when defined, or "" */
};

enum gr_kind {
	GR_REGION, /* one closed contour: points without the closing repeat */
	GR_DRAW,   /* a polyline: the D02 point then each D01 end point */
	GR_FLASH,  /* one point */
};

struct gr_object {
	enum gr_kind kind;
	int aperture;      /* D code for draws and flashes, 0 for regions */
	struct gp_ring points;
	int line;          /* where it starts in the file, 1-based */
	/* 5.3, 5.4: the region's .AperFunction from the dictionary, or its
	 * aperture's; the .N and .P object attributes ("" and has_net
	 * false when absent) */
	char function[GR_VALUE_MAX];
	bool has_net;
	char net[GR_VALUE_MAX];
	char pin[GR_VALUE_MAX];
};

struct gr_file {
	struct gr_aperture *apertures;
	size_t aperture_count;
	struct gr_object *objects;
	size_t object_count;
	char **attributes;   /* "TF.FileFunction,Other,front-ito" ... */
	size_t attribute_count;
	char error[256];     /* first violation, "line N: ... (spec X)" */
	bool has_md5;        /* .MD5 given (and matching: else an error) */
};

/* Reads text (need not be NUL-terminated).  False with file->error set on
 * the first violation; file must be finished either way. */
bool gr_read(const char *text, size_t size, struct gr_file *file);
void gr_file_finish(struct gr_file *file);
/* Spec 4.10.3 on one contour (points without the closing repeat): no
 * zero-length segment; segments meet only as consecutive segments at
 * their joint, as the two fully coincident segments of a cut-in, or at a
 * cut-in's end; cut-ins horizontal or vertical, all the same way; no
 * point passed more than twice, and one passed twice is a cut-in's end.
 * False with the first violation in why.  Quadratic: for tests. */
bool gr_contour_check(const struct gp_ring *contour, char *why, size_t size);
/* The value of file attribute name (".Part"): the text after "TF.Part,"
 * ("" for a bare attribute), or NULL when absent. */
const char *gr_attribute(const struct gr_file *file, const char *name);
const struct gr_aperture *gr_aperture_find(const struct gr_file *file,
					   int code);

#endif
