#include "artwork.h"

#include "array.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void gp_artwork_init(struct gp_artwork *art)
{
	memset(art, 0, sizeof(*art));
}

void gp_artwork_finish(struct gp_artwork *art)
{
	for (size_t i = 0; i < art->shape_count; i++)
		gp_polygon_finish(&art->shapes[i].poly);
	for (size_t i = 0; i < art->pixel_count; i++) {
		gp_polygon_finish(&art->pixels[i].shape);
		gp_polyset_finish(&art->pixels[i].more);
	}
	free(art->shapes);
	free(art->pixels);
	free(art->nets);
	gp_artwork_init(art);
}

int gp_artwork_add_net(struct gp_artwork *art, enum gp_net_kind kind,
		       enum gp_plate plate)
{
	if (!gp_array_reserve(art->nets, art->net_capacity, art->net_count + 1))
		return -1;
	int number = kind == GP_NET_COMMON ? ++art->common_count
					   : ++art->segment_count;
	struct gp_net *net = &art->nets[art->net_count];
	memset(net, 0, sizeof(*net));
	net->kind = kind;
	net->number = number;
	net->plate = plate;
	snprintf(net->name, sizeof(net->name), "%s%d",
		 kind == GP_NET_COMMON ? "COM" : "SEG", number);
	return (int)art->net_count++;
}

struct gp_shape *gp_artwork_add_shape(struct gp_artwork *art,
				      enum gp_layer layer, enum gp_role role,
				      int net, struct gp_polygon *poly)
{
	if (!gp_array_reserve(art->shapes, art->shape_capacity,
			      art->shape_count + 1))
		return NULL;
	struct gp_shape *shape = &art->shapes[art->shape_count++];
	memset(shape, 0, sizeof(*shape));
	shape->layer = layer;
	shape->role = role;
	shape->net = net;
	shape->poly = *poly;
	gp_polygon_init(poly);
	return shape;
}

struct gp_shape *gp_artwork_add_box(struct gp_artwork *art,
				    enum gp_layer layer, enum gp_role role,
				    int net, struct gp_box box)
{
	struct gp_polygon poly;
	gp_polygon_init(&poly);
	if (!gp_polygon_set_box(&poly, box))
		return NULL;
	struct gp_shape *shape = gp_artwork_add_shape(art, layer, role, net,
						      &poly);
	gp_polygon_finish(&poly);
	return shape;
}

struct gp_pixel *gp_artwork_add_pixel(struct gp_artwork *art, int common,
				      int segment, struct gp_box box)
{
	if (!gp_array_reserve(art->pixels, art->pixel_capacity,
			      art->pixel_count + 1))
		return NULL;
	struct gp_pixel *pixel = &art->pixels[art->pixel_count++];
	memset(pixel, 0, sizeof(*pixel));
	pixel->common = common;
	pixel->segment = segment;
	pixel->box = box;
	return pixel;
}

static const char *const layer_names[GP_LAYER_COUNT] = {
	[GP_LAYER_FRONT_ITO] = "front-ito",
	[GP_LAYER_BACK_ITO] = "back-ito",
	[GP_LAYER_SEAL] = "seal",
	[GP_LAYER_TRANSFER] = "transfer",
	[GP_LAYER_FRONT_OUTLINE] = "front-outline",
	[GP_LAYER_BACK_OUTLINE] = "back-outline",
};

static const char *const layer_titles[GP_LAYER_COUNT] = {
	[GP_LAYER_FRONT_ITO] = "Front plate ITO",
	[GP_LAYER_BACK_ITO] = "Back plate ITO",
	[GP_LAYER_SEAL] = "Seal print",
	[GP_LAYER_TRANSFER] = "Common transfers",
	[GP_LAYER_FRONT_OUTLINE] = "Front plate outline",
	[GP_LAYER_BACK_OUTLINE] = "Back plate outline",
};

const char *gp_layer_name(enum gp_layer layer)
{
	return layer < GP_LAYER_COUNT ? layer_names[layer] : "?";
}

const char *gp_layer_title(enum gp_layer layer)
{
	return layer < GP_LAYER_COUNT ? layer_titles[layer] : "?";
}

const char *gp_role_name(enum gp_role role)
{
	static const char *const names[] = {
		"electrode", "lead", "bridge", "patch", "pad",
		"transfer", "seal", "outline", "mark", "text",
	};
	return (size_t)role < sizeof(names) / sizeof(names[0]) ? names[role]
								: "?";
}

enum gp_layer gp_plate_ito_layer(enum gp_plate plate)
{
	return plate == GP_PLATE_FRONT ? GP_LAYER_FRONT_ITO : GP_LAYER_BACK_ITO;
}

enum gp_plate gp_layer_plate(enum gp_layer layer)
{
	switch (layer) {
	case GP_LAYER_FRONT_ITO:
	case GP_LAYER_FRONT_OUTLINE:
		return GP_PLATE_FRONT;
	default:
		return GP_PLATE_BACK;
	}
}
