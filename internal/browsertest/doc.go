// Package browsertest drives the service's HTML pages and charts in a real
// browser (Debian's chromium, through chromedp) against a live test server:
// every page loads without console errors, the load-check form submits and shows
// its verdict and table, the chart images decode at their stated size, and a
// screenshot of each page is kept in the test's temporary directory.
//
// The tests skip, saying what is missing, when no chromium is installed; CI
// installs it (.ci/run) and sets SCALEMATCH_BROWSER_TESTS=require, which turns
// the skip into a failure. SCALEMATCH_CHROMIUM names another browser binary;
// SCALEMATCH_SCREENSHOTS names a directory to keep the screenshots in instead.
package browsertest
