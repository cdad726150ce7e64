import {
  ChangeDetectionStrategy,
  Component,
  effect,
  inject,
  signal,
  untracked,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTooltipModule } from '@angular/material/tooltip';
import { RouterLink } from '@angular/router';
import type { Depot } from '@evalon/contracts';
import { firstValueFrom } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { Cautions } from '../../shared/cautions/cautions';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { PageHeader } from '../../shared/page-header/page-header';
import { LenderCatalogApi } from './lender-catalog-api';
import { DepotDialog, DepotDialogData, countryName } from './depot-dialog';
import { ShippingSettingsForm } from './shipping-settings-form';
import { activeLender } from '../../shared/active-lender';

/** The lender's depots (add, change) and its shipping settings. */
@Component({
  selector: 'ev-depots-settings',
  imports: [
    Cautions,
    EmptyState,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    MatProgressBarModule,
    MatTooltipModule,
    PageHeader,
    RouterLink,
    ShippingSettingsForm,
  ],
  templateUrl: './depots-settings.html',
  styleUrl: './depots-settings.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DepotsSettings {
  private readonly api = inject(LenderCatalogApi);
  private readonly dialog = inject(MatDialog);
  private readonly notifier = inject(Notifier);

  protected readonly lender = activeLender();

  protected readonly depots = signal<Depot[]>([]);
  protected readonly loading = signal(false);
  protected readonly loaded = signal(false);
  protected readonly loadError = signal<string | null>(null);

  constructor() {
    effect(() => {
      const lender = this.lender();
      untracked(() => void this.load(lender?.id ?? null));
    });
  }

  protected countryOf(code: string): string {
    return countryName(code) ?? code;
  }

  protected reload(): void {
    void this.load(this.lender()?.id ?? null);
  }

  protected async edit(depot?: Depot): Promise<void> {
    const lender = this.lender();
    if (!lender) return;
    const saved = await firstValueFrom(
      this.dialog
        .open<DepotDialog, DepotDialogData, Depot>(DepotDialog, {
          data: { lenderId: lender.id, depot },
          width: '720px',
          maxWidth: 'calc(100vw - 32px)',
          autoFocus: 'first-tabbable',
        })
        .afterClosed(),
    );
    if (!saved) return;
    this.depots.update((list) =>
      [...list.filter((d) => d.id !== saved.id), saved].sort((a, b) =>
        a.name.localeCompare(b.name),
      ),
    );
    this.notifier.success(depot ? `${saved.name} is saved.` : `${saved.name} is added.`);
  }

  private async load(lenderId: number | null): Promise<void> {
    if (lenderId === null) {
      this.loadError.set('Switch to a lender organisation to see its depots.');
      return;
    }
    this.loading.set(true);
    this.loadError.set(null);
    try {
      const depots = await firstValueFrom(this.api.depots(lenderId));
      if (lenderId !== this.lender()?.id) return;
      this.depots.set(depots);
      this.loaded.set(true);
    } catch (error) {
      if (lenderId === this.lender()?.id) this.loadError.set(messageOf(error));
    } finally {
      if (lenderId === this.lender()?.id) this.loading.set(false);
    }
  }
}
