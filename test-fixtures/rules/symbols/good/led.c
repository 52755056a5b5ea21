#include "strike.h"
void strike_led_blink(uint32_t times) { (void)times; }
