/* Hydrophone processing chain: C interface. */
#ifndef HYDRO_H
#define HYDRO_H
#include <stddef.h>

typedef struct hyd_chain hyd_chain;
typedef struct hyd_stage hyd_stage;
typedef struct hyd_monitor hyd_monitor;

hyd_chain *hyd_chain_new(void);
void hyd_chain_free(hyd_chain *chain);
hyd_stage *hyd_stage_new(float gain);
void hyd_stage_free(hyd_stage *stage);
/* Appends stage to the chain. */
int hyd_chain_append(hyd_chain *chain, hyd_stage *stage);
int hyd_chain_insert_front(hyd_chain *chain, hyd_stage *stage);

hyd_monitor *hyd_monitor_new(void);
void hyd_monitor_free(hyd_monitor *mon);
/* Level callback: ctx is the monitor from hyd_monitor_new, lent for the call. */
void hyd_monitor_level(void *ctx, float level);
#endif
