import { FORM_ID } from "./drive-log-columns";

/**
 * Previous and next page of the drive-log table. The buttons belong to the filters' GET form, so
 * without JavaScript they load the page with ?page=…; with it they turn the page in place.
 */
export function Pager({
  pageIndex,
  pageCount,
  canPrevious,
  canNext,
  onPrevious,
  onNext,
}: {
  /** The page shown, from 0. */
  pageIndex: number;
  pageCount: number;
  canPrevious: boolean;
  canNext: boolean;
  onPrevious: () => void;
  onNext: () => void;
}) {
  return (
    <nav
      aria-label="Pages of drive logs"
      className="flex items-center justify-between gap-3 text-sm"
    >
      <span>
        Page {pageIndex + 1} of {pageCount}
      </span>
      <span className="flex gap-2">
        <PageButton page={pageIndex} disabled={!canPrevious} onClick={onPrevious}>
          ← Previous
        </PageButton>
        <PageButton page={pageIndex + 2} disabled={!canNext} onClick={onNext}>
          Next →
        </PageButton>
      </span>
    </nav>
  );
}

function PageButton({
  page,
  disabled,
  onClick,
  children,
}: {
  page: number;
  disabled: boolean;
  onClick: () => void;
  children: React.ReactNode;
}) {
  return (
    <button
      type="submit"
      form={FORM_ID}
      name="page"
      value={page}
      disabled={disabled}
      onClick={(e) => {
        e.preventDefault();
        onClick();
      }}
      className="rounded-md border border-neutral-300 bg-white px-3 py-1.5 font-medium text-neutral-800 hover:bg-neutral-50 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-indigo-600 disabled:cursor-not-allowed disabled:opacity-50"
    >
      {children}
    </button>
  );
}
