typedef struct seis_filter seis_filter;
void seis_filter_reset(seis_filter *h);
