/* Signal kernels of the seismic-array front end. */
#include "seis/seis_dsp.h"

size_t seis_decimate(const int32_t *in, size_t n_in, uint32_t factor, float *out, size_t max_out)
{
    size_t written = 0;
    if (in == NULL || out == NULL || factor == 0)
        return 0;
    for (size_t start = 0; start + factor <= n_in && written < max_out; start += factor) {
        double acc = 0.0;
        for (uint32_t k = 0; k < factor; k++)
            acc += (double)in[start + k];
        out[written++] = (float)(acc / (double)factor);
    }
    return written;
}

uint32_t seis_crc32(const uint8_t *data, size_t nbytes)
{
    uint32_t crc = 0xFFFFFFFFu;
    if (data == NULL)
        return 0;
    for (size_t i = 0; i < nbytes; i++) {
        crc ^= data[i];
        for (int b = 0; b < 8; b++)
            crc = (crc >> 1) ^ (0xEDB88320u & (0u - (crc & 1u)));
    }
    return ~crc;
}

float seis_word_volts(seis_sample_word w, float lsb_uv)
{
    return (float)w.iq[0] * lsb_uv * 1e-6f;
}

const char *seis_gain_name(uint8_t gain)
{
    switch (gain) {
    case SEIS_GAIN_X1: return "x1";
    case SEIS_GAIN_X4: return "x4";
    case SEIS_GAIN_X16: return "x16";
    case SEIS_GAIN_X64: return "x64";
    default: return "?";
    }
}
