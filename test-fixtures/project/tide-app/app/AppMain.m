/* Tide-gauge handheld: the app delegate starts the Rust sampler once the view is up. */
@class TideView;

void tide_app_main(void);

@protocol TideGaugeDelegate
- (void)gaugeDidStart;
@end

int main(void) {
    tide_app_main();
    return 0;
}
