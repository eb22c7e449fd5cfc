/* Artwork: what the layout and routing stages produce and every writer and
 * check reads.  Plain data; the artwork owns everything it points to. */
#ifndef GP_ARTWORK_H
#define GP_ARTWORK_H

#include "geom.h"

#include <stdbool.h>
#include <stddef.h>

enum gp_layer {
	GP_LAYER_FRONT_ITO,
	GP_LAYER_BACK_ITO,
	GP_LAYER_SEAL,
	GP_LAYER_TRANSFER,
	GP_LAYER_FRONT_OUTLINE,
	GP_LAYER_BACK_OUTLINE,
	GP_LAYER_COUNT
};

enum gp_plate {
	GP_PLATE_FRONT,
	GP_PLATE_BACK,
};

enum gp_role {
	GP_ROLE_ELECTRODE, /* the part of a net that makes pixels */
	GP_ROLE_LEAD,      /* lead-out or lead-in trace */
	GP_ROLE_BRIDGE,    /* thin join between parts of one electrode */
	GP_ROLE_PATCH,     /* back electrode under icons and digits */
	GP_ROLE_PAD,       /* contact pad on the ledge */
	GP_ROLE_TRANSFER,  /* common-transfer dot */
	GP_ROLE_SEAL,
	GP_ROLE_OUTLINE,   /* cut outline, drawn as a line */
	GP_ROLE_MARK,      /* alignment mark */
	GP_ROLE_TEXT,      /* part number text in ITO, no net */
};

enum gp_net_kind {
	GP_NET_COMMON,
	GP_NET_SEGMENT,
};

#define GP_NET_NONE (-1)

struct gp_net {
	char name[24];          /* "COM3", "SEG12" */
	enum gp_net_kind kind;
	int number;             /* 1-based within its kind */
	enum gp_plate plate;    /* plate that carries the electrode */
	int pin;                /* 0 until routing assigns one */
};

struct gp_shape {
	enum gp_layer layer;
	enum gp_role role;
	int net;                /* index into nets, or GP_NET_NONE */
	struct gp_polygon poly;
	/* For GP_ROLE_OUTLINE / lines: width of the stroking aperture, nm;
	 * the polygon's outer ring is then a path, not a filled region. */
	int64_t line_width;
	bool open_path;         /* path not closed (lines only) */
	/* > 0: a round dot of this diameter (nm) at flash_centre, which the
	 * Gerber writer flashes; poly is then its flattened outline. */
	int64_t flash_diameter;
	struct gp_point flash_centre;
};

/* What lights where: one intended pixel. */
struct gp_pixel {
	int common;             /* net index */
	int segment;            /* net index */
	struct gp_box box;      /* nominal bounds */
	/* Nominal lit region when it is not just the box (icons, digits);
	 * empty (count 0) for plain rectangular dots. */
	struct gp_polygon shape;
	/* Further parts of the nominal lit region when it has several (the
	 * letters of a text icon); shape holds the first.  Usually empty. */
	struct gp_polyset more;
	/* Who owns it, for reports: "block main line 1 cell 3 row 2 col 4". */
	int owner_kind;         /* enum gp_owner_kind */
	int owner;              /* index of the block/digit row/icon */
	int a, b, c, d;         /* owner-specific: line, cell, row, col / digit, segment */
};

enum gp_owner_kind {
	GP_OWNER_BLOCK,
	GP_OWNER_DIGITS,
	GP_OWNER_ICON,
};

struct gp_artwork {
	struct gp_net *nets;
	size_t net_count, net_capacity;
	int common_count, segment_count;
	struct gp_shape *shapes;
	size_t shape_count, shape_capacity;
	struct gp_pixel *pixels;
	size_t pixel_count, pixel_capacity;
};

void gp_artwork_init(struct gp_artwork *art);
void gp_artwork_finish(struct gp_artwork *art);
/* Returns the new net's index, or -1 when out of memory. */
int gp_artwork_add_net(struct gp_artwork *art, enum gp_net_kind kind,
		       enum gp_plate plate);
/* Moves poly into a new shape; returns it, or NULL when out of memory. */
struct gp_shape *gp_artwork_add_shape(struct gp_artwork *art,
				      enum gp_layer layer, enum gp_role role,
				      int net, struct gp_polygon *poly);
struct gp_shape *gp_artwork_add_box(struct gp_artwork *art,
				    enum gp_layer layer, enum gp_role role,
				    int net, struct gp_box box);
struct gp_pixel *gp_artwork_add_pixel(struct gp_artwork *art, int common,
				      int segment, struct gp_box box);
const char *gp_layer_name(enum gp_layer layer);   /* "front-ito" */
const char *gp_layer_title(enum gp_layer layer);  /* "Front plate ITO" */
const char *gp_role_name(enum gp_role role);
enum gp_layer gp_plate_ito_layer(enum gp_plate plate);
/* The plate a layer is made on: its own for the ITO, outlines and
 * coatings; the back plate for the seal and transfer prints (glassplot
 * draws them for printing on the back plate's inner face). */
enum gp_plate gp_layer_plate(enum gp_layer layer);

#endif
