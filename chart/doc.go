// Package chart draws the few charts sizebudget needs — a histogram, x–y curves and horizontal bars —
// as small standalone SVG documents. It uses the standard library only, so it stays light in the
// WebAssembly build, and it is shared by the browser app and by the command line's -svg outputs.
//
// Units are the caller's: the package draws numbers and prints the labels it is given.
//
// Every document
//   - is standalone SVG 1.1 with an xmlns and a viewBox, so it scales to any width
//     (CSS such as `width: 100%; height: auto` works on the inline element);
//   - carries role="img", an aria-label, and <title> and <desc> elements for screen readers;
//   - uses only presentation attributes: no <style> element, no style attributes, no <script>, no
//     event handlers and no external resources, so it passes a strict Content-Security-Policy;
//   - sizes its text so that it is at least 12 px tall when the image is shown 360 px wide;
//   - is deterministic: coordinates are printed with one decimal, so golden files are stable.
//
// Bad data (empty, NaN or infinite values, mismatched lengths, non-positive values on a log axis)
// is reported as an error, never a panic.
//
// References:
//   - W3C, Scalable Vector Graphics (SVG) 1.1 (Second Edition), 2011.
//   - W3C, WAI-ARIA Graphics Module 1.0, 2018 (role="img" on graphics).
//   - Okabe M., Ito K. (2008) Color Universal Design (CUD): how to make figures and presentations that
//     are friendly to colorblind people, J*Fly (colour-blind-safe palette).
//   - Heckbert P.S. (1990) Nice numbers for graph labels, in Graphics Gems, Academic Press, 61–63
//     (1-2-5 tick steps).
package chart
