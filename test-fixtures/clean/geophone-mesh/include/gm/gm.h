/* Geophone mesh: the C interface of the Rust mesh core (rust/src). Included by the C++ stream
 * blocks (blocks/) and the field driver (app/). Plain C11 so a C block could use it too. */
#ifndef GM_GM_H
#define GM_GM_H

#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

/* ---- calibration table: shared, reference counted ---- */

/** A per-node gain table. Shared: every holder retains it and releases it once. */
typedef struct gm_calib gm_calib;

/** Makes a table from n gains (copied; gains may be NULL when n is 0). The caller holds one
 * reference. Returns NULL when a gain is not finite. Release with gm_calib_release. */
gm_calib *gm_calib_new(const float *gains, size_t n);
/** Adds a reference; calib must not be NULL. Each retain is matched by one gm_calib_release. */
void gm_calib_retain(const gm_calib *calib);
/** Drops one reference; the table is freed with the last one. NULL is ignored. */
void gm_calib_release(const gm_calib *calib);
/** The gain of node `node` (1.0 past the end of the table). Borrows calib. */
float gm_calib_gain(const gm_calib *calib, size_t node);
/** Number of nodes in the table. Borrows calib. */
size_t gm_calib_len(const gm_calib *calib);

/* ---- event tally: shared between threads, reference counted ---- */

/** Counts of trigger events per node, updated from any thread. */
typedef struct gm_tally gm_tally;

/** Makes a tally for `nodes` nodes. The caller holds one reference. Release with gm_tally_release. */
gm_tally *gm_tally_new(uint32_t nodes);
/** Adds a reference; tally must not be NULL. */
void gm_tally_retain(const gm_tally *tally);
/** Drops one reference. NULL is ignored. */
void gm_tally_release(const gm_tally *tally);
/** Counts one event of node `node` with amplitude `amp`; thread-safe. Returns 0, or -1 when
 * node is out of range. */
int gm_tally_add(const gm_tally *tally, uint32_t node, float amp);
/** Total events counted so far; thread-safe. */
uint64_t gm_tally_total(const gm_tally *tally);
/** Largest amplitude counted so far; thread-safe. */
float gm_tally_peak(const gm_tally *tally);

/* ---- stream: calibrated blocks handed to a C callback ---- */

/** Receives each calibrated block; samples is valid only during the call. */
typedef void (*gm_block_cb)(const float *samples, size_t n, void *user);

typedef struct gm_stream gm_stream;

/** Makes a stream for node `node` that scales samples by the table's gain and passes them to
 * cb(…, user). The stream keeps its own reference to calib. Returns NULL when calib or cb is
 * NULL. user must stay valid until gm_stream_release. */
gm_stream *gm_stream_new(const gm_calib *calib, uint32_t node, gm_block_cb cb, void *user);
/** Scales n samples into the stream's scratch block and calls the callback once. Returns the
 * number of samples delivered. */
size_t gm_stream_push(gm_stream *stream, const float *samples, size_t n);
/** Frees the stream and its reference to the table. NULL is ignored. */
void gm_stream_release(gm_stream *stream);

/* ---- mesh: opened through an out-parameter ---- */

typedef struct gm_cfg {
    uint32_t nodes;   /**< number of geophones */
    uint32_t rate_hz; /**< sample rate */
    float threshold;  /**< trigger threshold, > 0 */
} gm_cfg;

typedef struct gm_mesh gm_mesh;

#define GM_OK 0
#define GM_EINVAL (-1)

/** Opens a mesh. On success stores the mesh in *out and returns GM_OK; otherwise leaves *out
 * untouched and returns GM_EINVAL. Close with gm_mesh_close. */
int gm_mesh_open(const gm_cfg *cfg, const gm_calib *calib, gm_mesh **out);
/** A new reference to the mesh's calibration table; release it with gm_calib_release. */
gm_calib *gm_mesh_calib(const gm_mesh *mesh);
/** Feeds n samples of node `node`; events above the threshold go to tally. Returns the number
 * of events. */
uint32_t gm_mesh_feed(gm_mesh *mesh, const gm_tally *tally, uint32_t node, const float *samples, size_t n);
/** Closes the mesh. NULL is ignored. */
void gm_mesh_close(gm_mesh *mesh);

#ifdef __cplusplus
}
#endif

#endif /* GM_GM_H */
