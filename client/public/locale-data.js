/**
 * The first use of Intl in a page loads the browser's locale data: about 40 ms of processor, 150-250
 * ms on a phone 4× slower, spent by whichever comes first: a date formatter, a number's
 * toLocaleString, the time zone. index.html runs this file as a classic async script as
 * soon as it has come, while the page's larger scripts are still on their way and the processor
 * waits for them, so the first screen (times, figures) does not spend it before its heading. It uses
 * the locales and kinds the pages use (en-GB dates and times, en-US figures, the phone's time zone);
 * its results are dropped.
 */
new Intl.DateTimeFormat('en-GB', { weekday: 'short', day: 'numeric', month: 'short', hour: '2-digit', minute: '2-digit' }).format(0);
(1234.5).toLocaleString('en-US', { minimumFractionDigits: 1, maximumFractionDigits: 1 });
Intl.DateTimeFormat().resolvedOptions();
