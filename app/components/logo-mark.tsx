/** Two discs on one shaft, joined by a spring: our own mark. */
export function LogoMark() {
  return (
    <svg width="22" height="22" viewBox="0 0 24 24" aria-hidden="true" className="text-indigo-600">
      <circle cx="6" cy="12" r="5" fill="currentColor" />
      <circle cx="18" cy="12" r="4" fill="none" stroke="currentColor" strokeWidth="2" />
      <path
        d="M10 12 l1.2 -2 l1.6 4 l1.6 -4 l1.2 2"
        fill="none"
        stroke="currentColor"
        strokeWidth="1.5"
      />
    </svg>
  );
}
