/* Lightning-detector front end: mode control. */
int lm_set_mode(int mode);
int lm_get_mode(void);
