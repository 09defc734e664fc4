/** The first stop of the keyboard on every frame: jumps to the page's main content. */
export function SkipLink() {
  return (
    <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-[1200] focus:bg-sheet focus:p-3">
      Skip to the page
    </a>
  );
}
