import {
  ChangeDetectionStrategy,
  Component,
  computed,
  effect,
  inject,
  signal,
  untracked,
  viewChild,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import { Router, RouterLink } from '@angular/router';
import type { Model, ModelCategory } from '@evalon/contracts';
import { formatMoney } from '@evalon/deposits';
import { firstValueFrom } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { SessionStore } from '../../core/session-store';
import { Cautions } from '../../shared/cautions/cautions';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { PageHeader } from '../../shared/page-header/page-header';
import { LenderCatalogApi } from './lender-catalog-api';
import { modelCategories, modelCategoryLabels } from './catalog-rules';
import { depositRuleShort } from './money';

/** A model with what the table shows already worked out. */
export interface ModelRow {
  readonly model: Model;
  readonly categoryLabel: string;
  readonly listValue: string;
  readonly depositRule: string;
  readonly depositPerUnit: string;
  readonly photoUrl: string | null;
}

/** The lender's models: a sortable, filterable, paged table that opens the model editor. */
@Component({
  selector: 'ev-catalog-models',
  imports: [
    Cautions,
    EmptyState,
    MatButtonModule,
    MatCardModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatPaginatorModule,
    MatProgressBarModule,
    MatSelectModule,
    MatSortModule,
    MatTableModule,
    MatTooltipModule,
    PageHeader,
    RouterLink,
  ],
  templateUrl: './catalog-models.html',
  styleUrl: './catalog-models.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CatalogModels {
  private readonly api = inject(LenderCatalogApi);
  private readonly session = inject(SessionStore);
  private readonly router = inject(Router);

  protected readonly categories = modelCategories;
  protected readonly categoryLabels = modelCategoryLabels;
  protected readonly columns = ['name', 'category', 'listValue', 'deposit', 'units', 'actions'];

  protected readonly lender = computed(() => {
    const organisation = this.session.activeOrganisation();
    return organisation?.kind === 'lender' ? organisation : null;
  });

  private readonly models = signal<Model[]>([]);
  protected readonly loading = signal(false);
  /** Whether the list has been loaded at least once for this lender. */
  protected readonly loaded = signal(false);
  protected readonly loadError = signal<string | null>(null);
  protected readonly filterText = signal('');
  protected readonly category = signal<ModelCategory | ''>('');

  protected readonly rows = computed<ModelRow[]>(() =>
    this.models().map((model) => ({
      model,
      categoryLabel: modelCategoryLabels[model.category],
      listValue: formatMoney(model.listValue, model.currency),
      depositRule: depositRuleShort(model.depositRule),
      depositPerUnit: formatMoney(model.depositPerUnit.amount, model.depositPerUnit.currency),
      photoUrl: model.photos[0]?.url ?? null,
    })),
  );

  protected readonly summary = computed(() => {
    const models = this.models();
    const units = models.reduce((sum, m) => sum + m.unitCount, 0);
    return `${models.length} ${models.length === 1 ? 'model' : 'models'} · ${units} ${units === 1 ? 'unit' : 'units'}`;
  });

  protected readonly dataSource = new MatTableDataSource<ModelRow>([]);
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);

  constructor() {
    this.dataSource.filterPredicate = (row, filter) => {
      const { text, category } = JSON.parse(filter) as { text: string; category: string };
      if (category && row.model.category !== category) return false;
      if (!text) return true;
      return [row.model.name, row.model.description, row.categoryLabel]
        .join(' ')
        .toLowerCase()
        .includes(text);
    };
    this.dataSource.sortingDataAccessor = (row, column) => {
      switch (column) {
        case 'category':
          return row.categoryLabel;
        case 'listValue':
          // Amounts in different currencies do not compare; models of one lender share one.
          return row.model.listValue;
        case 'deposit':
          return row.model.depositPerUnit.amount;
        case 'units':
          return row.model.unitCount;
        default:
          return row.model.name.toLocaleLowerCase();
      }
    };

    effect(() => {
      const lender = this.lender();
      untracked(() => void this.load(lender?.id ?? null));
    });
    effect(() => {
      this.dataSource.data = this.rows();
    });
    effect(() => {
      this.dataSource.filter = JSON.stringify({
        text: this.filterText().trim().toLowerCase(),
        category: this.category(),
      });
      untracked(() => this.paginator()?.firstPage());
    });
    effect(() => {
      this.dataSource.sort = this.sort() ?? null;
      this.dataSource.paginator = this.paginator() ?? null;
    });
  }

  protected reload(): void {
    void this.load(this.lender()?.id ?? null);
  }

  protected setFilter(event: Event): void {
    this.filterText.set((event.target as HTMLInputElement).value);
  }

  protected open(row: ModelRow): void {
    void this.router.navigate(['/catalog/models', row.model.id]);
  }

  /** Whether a filter hides some models. */
  protected readonly filtered = computed(() => !!this.filterText().trim() || !!this.category());

  protected clearFilters(): void {
    this.filterText.set('');
    this.category.set('');
  }

  private async load(lenderId: number | null): Promise<void> {
    if (lenderId === null) {
      this.loadError.set('Switch to a lender organisation to see its catalog.');
      return;
    }
    this.loading.set(true);
    this.loadError.set(null);
    try {
      const models = await firstValueFrom(this.api.models(lenderId));
      if (lenderId !== this.lender()?.id) return; // An older answer; a newer load runs.
      this.models.set(models.filter((m) => m.lenderId === lenderId));
      this.loaded.set(true);
    } catch (error) {
      if (lenderId !== this.lender()?.id) return;
      this.loadError.set(messageOf(error));
    } finally {
      if (lenderId === this.lender()?.id) this.loading.set(false);
    }
  }
}
