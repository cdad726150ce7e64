import { Signal, WritableSignal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { Observable, catchError, filter, of, switchMap, tap } from 'rxjs';
import { messageOf } from '../../core/api-error';

/** Options of {@link loadOnChange}. */
export interface LoadOnChangeOptions<P, A> {
  /** What to ask for (include a retry counter to load again); null asks for nothing. */
  readonly params: Signal<P | null>;
  /** Asks the server. */
  readonly load: (params: P) => Observable<A>;
  /** Set while a request is on its way. */
  readonly loading: WritableSignal<boolean>;
  /** Why the last request failed, in words; cleared when the next one starts. */
  readonly error: WritableSignal<string | null>;
  /** Takes an answer that arrived. */
  readonly done: (answer: A) => void;
}

/**
 * Loads a list that comes in one piece whenever its parameters change; a newer request replaces
 * one still on its way. For the pages that keep and change the rows themselves (a paged table
 * uses `listSource`). Call in an injection context: it ends with the component.
 */
export function loadOnChange<P, A>(options: LoadOnChangeOptions<P, A>): void {
  toObservable(options.params)
    .pipe(
      filter((params): params is P => params !== null),
      tap(() => {
        options.loading.set(true);
        options.error.set(null);
      }),
      switchMap((params) =>
        options.load(params).pipe(
          catchError((error: unknown) => {
            options.error.set(messageOf(error));
            return of(null);
          }),
        ),
      ),
      takeUntilDestroyed(),
    )
    .subscribe((answer) => {
      if (answer !== null) options.done(answer);
      options.loading.set(false);
    });
}
