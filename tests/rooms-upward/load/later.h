/* A header of the room load/, for the planted include in base/. */
