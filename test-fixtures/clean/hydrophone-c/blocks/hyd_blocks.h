/*
 * hyd_blocks.h - the recorder's stream blocks (plain C11). Each block is a struct the caller
 * owns; *_init fills it (and on failure leaves nothing allocated), *_destroy releases what it
 * holds and may be called again on a destroyed block.
 */
#ifndef HYD_BLOCKS_H
#define HYD_BLOCKS_H

#include <stddef.h>
#include <stdint.h>

#include "hyd/hyd_kernels.h"

/** Channels of the array (hydrophones per frame). */
#define HYD_NCHAN 4
/** Events one detect block keeps. */
#define HYD_MAX_EVENTS 16

/** Per-channel band-pass filtering of interleaved frames, then a common gain. */
typedef struct hyd_bandpass_block {
    size_t nchan;
    hyd_fir **fir;   /* nchan filters, one per channel */
    float *chan;     /* one channel of max_frames samples, deinterleaved */
    size_t max_frames;
    float gain;
} hyd_bandpass_block;

int hyd_bandpass_init(hyd_bandpass_block *b, size_t nchan, const float *const *taps,
                      const size_t *ntaps, size_t max_frames, float gain);
/** Filters nframes interleaved frames (nframes * nchan floats) in place; returns frames done. */
size_t hyd_bandpass_work(hyd_bandpass_block *b, float *frames, size_t nframes);
void hyd_bandpass_destroy(hyd_bandpass_block *b);

/** Steers the array towards one bearing (a delay per hydrophone). */
typedef struct hyd_beam_block {
    hyd_beam *beam;
    float *out;      /* max_frames beam samples */
    size_t max_frames;
} hyd_beam_block;

int hyd_beam_block_init(hyd_beam_block *b, unsigned spacing_frames, size_t max_frames);
/** Forms the beam of nframes frames; the result is b->out[0 .. return value). */
size_t hyd_beam_block_work(hyd_beam_block *b, const float (*frames)[HYD_NCHAN], size_t nframes);
void hyd_beam_block_destroy(hyd_beam_block *b);

/** Finds transients in the beam (optionally pre-filtered) and keeps the first few. */
typedef struct hyd_detect_block {
    hyd_det *det;
    hyd_fir *pre;    /* NULL: no pre-filter */
    float *work;     /* max_n samples, the pre-filter's output */
    size_t max_n;
    uint64_t t;      /* absolute index of the next sample */
    hyd_event events[HYD_MAX_EVENTS];
    size_t nevents;
    size_t dropped;
} hyd_detect_block;

int hyd_detect_init(hyd_detect_block *b, float threshold, const float *pre_taps, size_t npre,
                    size_t max_n);
/** Feeds n beam samples; returns the events reported during the call. */
uint32_t hyd_detect_work(hyd_detect_block *b, const float *x, size_t n);
/** Closes an event still open at the end of the recording. */
void hyd_detect_finish(hyd_detect_block *b);
void hyd_detect_destroy(hyd_detect_block *b);

#endif /* HYD_BLOCKS_H */
