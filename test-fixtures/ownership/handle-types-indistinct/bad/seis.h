/* Seismic array: two different handle types. */
#include <stdint.h>
typedef struct seis_picker seis_picker;
typedef struct seis_trace seis_trace;
void seis_picker_reset(seis_picker *p);
void seis_trace_clear(seis_trace *t);
