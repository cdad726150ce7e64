import { ChangeDetectionStrategy, Component, DestroyRef, inject, input } from '@angular/core';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import type { ListQuery } from './list-query';

/** How long typing may pause before the search goes out, in milliseconds. */
const searchDelayMs = 300;

/** A list page's search field: its words go to the URL (`q`) once typing pauses. */
@Component({
  selector: 'ev-list-search',
  imports: [MatFormFieldModule, MatIconModule, MatInputModule],
  template: `
    <mat-form-field appearance="outline" subscriptSizing="dynamic">
      <mat-label>{{ label() }}</mat-label>
      <mat-icon matPrefix>search</mat-icon>
      <input
        matInput
        type="search"
        [placeholder]="placeholder()"
        [value]="query().request().q"
        (input)="typed($event)"
      />
    </mat-form-field>
  `,
  styles: `
    :host {
      display: block;
    }
    mat-form-field {
      width: 100%;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ListSearch {
  /** The list the words search. */
  readonly query = input.required<ListQuery<string, string>>();
  /** The field's label, saying what the words match. */
  readonly label = input.required<string>();
  readonly placeholder = input('');

  private timer: ReturnType<typeof setTimeout> | undefined;

  constructor() {
    inject(DestroyRef).onDestroy(() => clearTimeout(this.timer));
  }

  protected typed(event: Event): void {
    const words = (event.target as HTMLInputElement).value;
    clearTimeout(this.timer);
    this.timer = setTimeout(() => this.query().setSearch(words), searchDelayMs);
  }
}
