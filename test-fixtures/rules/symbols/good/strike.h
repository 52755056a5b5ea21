#include <stdint.h>
#ifdef __cplusplus
extern "C" {
#endif
int strike_window_ms(uint32_t ms);
float strike_gain(float db);
void strike_led_blink(uint32_t times);
#ifdef __cplusplus
}
#endif
