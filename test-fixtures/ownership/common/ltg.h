/* Lightning-detector front end: C interface of the Rust stroke kernels (hand-written).
 * Shared by the C++ fixtures of the ownership rules. */
#ifndef LTG_H
#define LTG_H

#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

/* Opaque stroke tracker and sensor channel, both owned by Rust. */
typedef struct ltg_tracker ltg_tracker;
typedef struct ltg_sensor ltg_sensor;

ltg_tracker *ltg_tracker_new(uint32_t window);
int ltg_tracker_feed(ltg_tracker *h, float field_vm);
uint32_t ltg_tracker_count(const ltg_tracker *h);
void ltg_tracker_free(ltg_tracker *h);

ltg_sensor *ltg_sensor_new(uint32_t channel);
float ltg_sensor_gain(const ltg_sensor *s);
void ltg_sensor_free(ltg_sensor *s);

/* Channel label; release with ltg_label_free. */
char *ltg_label(uint32_t channel);
void ltg_label_free(char *s);

#ifdef __cplusplus
}
#endif

#endif /* LTG_H */
