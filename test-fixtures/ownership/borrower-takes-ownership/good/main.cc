// Drives the picker the way a C++ block does: create, push twice, reset, free.
extern "C" {
struct seis_picker;
seis_picker *seis_picker_new();
int seis_picker_push(seis_picker *p, double sample);
void seis_picker_reset(seis_picker *p);
void seis_picker_free(seis_picker *p);
}

int main() {
    seis_picker *p = seis_picker_new();
    seis_picker_push(p, 0.5);
    seis_picker_reset(p);
    seis_picker_push(p, 0.25);
    seis_picker_free(p);
    return 0;
}
