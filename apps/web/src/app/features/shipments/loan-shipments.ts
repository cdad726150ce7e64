import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { shipmentStateLabels, type ShipmentSummary } from '@evalon/contracts';
import { catchError, of, switchMap } from 'rxjs';
import { DayPipe } from '../../shared/formats';
import { ShipmentApi } from './shipment-api';

/** The hospital's next task on a leg, in plain words, or null. */
export function taskFor(s: ShipmentSummary): string | null {
  if (s.direction === 'outbound' && s.state === 'delivered' && s.loanState === 'shipped') {
    return 'Confirm receipt: check the items against the checklist.';
  }
  if (s.direction === 'return' && s.state === 'awaiting_return') {
    return `Decontaminate, record it, then book the return by ${s.dueBy}.`;
  }
  return null;
}

/** Whether a return is on its way back to the depot (its deadline is then the depot's). */
export const onTheWay = (s: ShipmentSummary): boolean =>
  s.direction === 'return' && ['handed_over', 'in_transit', 'exception'].includes(s.state);

/** The loan page's shipments card: each leg's state and tracking, and the hospital's return tasks. */
@Component({
  selector: 'ev-loan-shipments',
  imports: [DayPipe, MatButtonModule, MatCardModule, MatIconModule, RouterLink],
  template: `
    @if (legs().length > 0) {
      <mat-card appearance="outlined">
        <mat-card-header><mat-card-title>Shipments</mat-card-title></mat-card-header>
        <mat-card-content>
          <ul class="legs">
            @for (s of legs(); track s.id) {
              <li>
                <mat-icon aria-hidden="true">{{
                  s.direction === 'outbound' ? 'north_east' : 'south_west'
                }}</mat-icon>
                <div>
                  <a [routerLink]="['/shipments', s.id]">{{ s.reference }}</a>
                  · <strong class="leg-state">{{ labels[s.state] }}</strong>
                  @if (s.trackingNumber) {
                    · tracking {{ s.trackingNumber }}
                  }
                  @if (s.eta && s.direction === 'outbound' && s.state !== 'delivered') {
                    · expected {{ s.eta | day }}
                  }
                  @if (s.eta && s.direction === 'return' && onTheWay(s)) {
                    · expected at the depot {{ s.eta | day }}
                  }
                  @if (task(s); as t) {
                    <div class="task">
                      <mat-icon aria-hidden="true">assignment_late</mat-icon>{{ t }}
                      <a mat-button [routerLink]="['/shipments', s.id]">Open</a>
                    </div>
                  }
                </div>
              </li>
            }
          </ul>
        </mat-card-content>
      </mat-card>
    }
  `,
  styles: `
    .legs {
      list-style: none;
      margin: 0;
      padding: 0;
      display: flex;
      flex-direction: column;
      gap: 8px;
    }
    li {
      display: flex;
      gap: 8px;
    }
    .task {
      display: flex;
      align-items: center;
      gap: 6px;
      color: var(--mat-sys-tertiary);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LoanShipments {
  private readonly api = inject(ShipmentApi);

  /** The loan whose legs to show. */
  readonly loanId = input.required<number>();

  protected readonly labels = shipmentStateLabels;
  protected readonly legs = signal<ShipmentSummary[]>([]);
  protected readonly task = taskFor;
  protected readonly onTheWay = onTheWay;

  constructor() {
    toObservable(this.loanId)
      .pipe(
        switchMap((loanId) =>
          this.api
            .list({ loanId, pageSize: 50, sort: 'reference' })
            .pipe(catchError(() => of(null))),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((r) => this.legs.set(r?.shipments ?? []));
  }
}
