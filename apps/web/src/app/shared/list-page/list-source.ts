import { DataSource } from '@angular/cdk/collections';
import { Signal, TrackByFunction, computed, linkedSignal } from '@angular/core';
import { rxResource, toObservable } from '@angular/core/rxjs-interop';
import type { Page } from '@evalon/contracts/values';
import { Observable } from 'rxjs';
import { messageOf } from '../../core/api-error';

/** Options of {@link listSource}. */
export interface ListSourceOptions<R, P, A extends Page<unknown>> {
  /** What to ask for; `undefined` asks for nothing (e.g. no organisation chosen yet). */
  readonly params: () => P | undefined;
  /** Asks the server for one page. */
  readonly load: (params: P) => Observable<A>;
  /**
   * The table's rows from an answer (what each row shows, worked out once). Runs in a
   * `computed`, so signals it reads (e.g. the viewer's time zone) update the rows.
   */
  readonly rows: (answer: A) => readonly R[];
  /**
   * What tells rows apart (an id). A row whose id stays keeps its DOM when a page loads again,
   * so an open menu or a focused control in it survives a reload of the same rows.
   */
  readonly key: (row: R) => unknown;
}

/** What the list's status, no-rows row and paginator read from a {@link ListSource}. */
export interface ListLoadState {
  /** Rows matching the request across all pages. */
  readonly total: Signal<number>;
  /** Whether a request is on its way. */
  readonly loading: Signal<boolean>;
  /** Whether an answer has arrived at least once. */
  readonly loaded: Signal<boolean>;
  /** Why the last request failed, in words; null when it did not. */
  readonly error: Signal<string | null>;
  /** Asks for the same page again. */
  reload(): void;
}

/**
 * The rows of one server page for a `mat-table`, loaded with an Angular resource whenever the
 * request changes. While the next page loads the table keeps showing the last one (no flicker);
 * `loading`, `error` and `loaded` drive the progress bar, the error and the empty states.
 */
export class ListSource<R, P, A extends Page<unknown>>
  extends DataSource<R>
  implements ListLoadState
{
  private readonly resource;
  /** The last answer that arrived, kept while the next one loads. */
  readonly answer: Signal<A | null>;
  /** Rows of the current page. */
  readonly items: Signal<readonly R[]>;
  /** Rows matching the request across all pages. */
  readonly total = computed(() => this.answer()?.total ?? 0);
  /** Whether a request is on its way. */
  readonly loading: Signal<boolean>;
  /** Whether an answer has arrived at least once. */
  readonly loaded = computed(() => this.answer() !== null);
  /** Why the last request failed, in words; null when it did not. */
  readonly error: Signal<string | null>;
  private readonly rows;
  /** `trackBy` for the table: rows are the same row when their keys are equal. */
  readonly trackBy: TrackByFunction<R>;

  constructor(options: ListSourceOptions<R, P, A>) {
    super();
    this.resource = rxResource({
      params: options.params,
      stream: ({ params }) => options.load(params),
    });
    const resource = this.resource;
    this.answer = linkedSignal<A | undefined, A | null>({
      source: () => (resource.hasValue() ? resource.value() : undefined),
      computation: (value, previous) => value ?? previous?.value ?? null,
    });
    this.items = computed(() => {
      const answer = this.answer();
      return answer ? options.rows(answer) : [];
    });
    this.loading = computed(() => resource.isLoading());
    this.error = computed(() => {
      const error = resource.error();
      return error ? messageOf(error) : null;
    });
    this.rows = toObservable(this.items);
    this.trackBy = (_, row) => options.key(row);
  }

  /** Changes the rows on hand (e.g. after a change the server confirmed), without a request. */
  update(change: (answer: A) => A): void {
    const answer = this.answer();
    if (answer) this.resource.set(change(answer));
  }

  /** Asks for the same page again (after an error, or after a change elsewhere). */
  reload(): void {
    this.resource.reload();
  }

  connect(): Observable<readonly R[]> {
    return this.rows;
  }

  disconnect(): void {
    // The resource ends with the component's injector; nothing else to release.
  }
}

/** Creates a {@link ListSource}; call in an injection context (a field initialiser). */
export function listSource<R, P, A extends Page<unknown>>(
  options: ListSourceOptions<R, P, A>,
): ListSource<R, P, A> {
  return new ListSource<R, P, A>(options);
}
