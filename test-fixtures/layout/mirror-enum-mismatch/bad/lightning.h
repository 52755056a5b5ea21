/* Lightning-detector front end. */
enum lightning_mode { LM_IDLE, LM_ARMED, LM_TRIGGERED };
enum polarity { POL_POS, POL_NEG };
enum strike_kind { SK_CLOUD = 1, SK_GROUND = 2, SK_UNKNOWN = 3 };

struct strike_event {
    enum polarity pol;
    float peak_ka;
};

void lm_report(const struct strike_event *ev, enum strike_kind kind);
