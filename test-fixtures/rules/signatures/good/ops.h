/* Lightning-detector plug-in table: the host fills it in, the Rust core calls through it. */
#ifndef LD_OPS_H
#define LD_OPS_H
#include <stdint.h>

typedef void (*ld_log_fn)(void *ctx, const char *line);

/* Callbacks of a detector plug-in. on_strike is required; on_overflow may be NULL when the
 * plug-in does not care about dropped samples. */
typedef struct ld_plugin_ops {
    void *ctx;
    int (*on_strike)(void *ctx, double amplitude);
    void (*on_overflow)(void *ctx, uint32_t dropped);
    /* Optional line logger; may be NULL. */
    ld_log_fn log;
    void (*_Nullable on_close)(void *ctx);
} ld_plugin_ops;

int ld_register(const ld_plugin_ops *ops);

#endif
