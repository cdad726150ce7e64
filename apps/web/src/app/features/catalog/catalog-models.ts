import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatSelectModule } from '@angular/material/select';
import { MatSortModule } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { MatTooltipModule } from '@angular/material/tooltip';
import type { Model, ModelCategory, ModelPage } from '@evalon/contracts';
import { modelSortFields } from '@evalon/contracts/values';
import { formatMoney } from '@evalon/deposits';
import { Cautions } from '../../shared/cautions/cautions';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { throwError } from 'rxjs';
import { noLender } from '../../core/api-error';
import { ListPage, ListPageParts, listQuery, listSource, listWords } from '../../shared/list-page';
import { PageHeader } from '../../shared/page-header/page-header';
import { LenderCatalogApi } from './lender-catalog-api';
import { modelCategories, modelCategoryLabels } from '@evalon/contracts/values';
import { depositRuleShort } from './money';
import { activeLender } from '../../shared/active-lender';

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
    ListPageParts,
    MatButtonModule,
    MatCardModule,
    MatFormFieldModule,
    MatIconModule,
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

  protected readonly categories = modelCategories;
  protected readonly categoryLabels = modelCategoryLabels;
  protected readonly columns = ['name', 'category', 'listValue', 'deposit', 'units', 'actions'];

  protected readonly lender = activeLender();

  /** Page, size, order, search words and category, in the URL. */
  protected readonly query = listQuery({
    sortFields: modelSortFields,
    defaultSort: { field: 'name', dir: 'asc' },
    filters: ['category'],
  });

  /** The page of the lender's models the URL asks for. */
  protected readonly models = listSource({
    params: () => ({ lenderId: this.lender()?.id ?? null, request: this.query.request() }),
    load: ({ lenderId, request }) =>
      lenderId === null
        ? throwError(() => noLender('Switch to a lender organisation to see its catalog.'))
        : this.api.modelPage(lenderId, request),
    rows: (answer: ModelPage) => answer.items.map(toRow),
    key: (row) => row.model.id,
  });

  /** The list as its template's parts see it. */
  protected readonly list: ListPage = {
    query: this.query,
    source: this.models,
    words: listWords('model', 'models', { error: 'The catalog couldn’t be loaded' }),
  };

  protected readonly summary = computed(() => {
    const answer = this.models.answer();
    if (!answer) return '';
    const { total, unitTotal } = answer;
    // Retired units are not counted here (nor in the Units column): they can never be lent. The
    // units page counts them, so it says one more when one unit is retired; "in service" tells
    // the reader which number this is.
    return `${total} ${total === 1 ? 'model' : 'models'} · ${unitTotal} ${unitTotal === 1 ? 'unit' : 'units'} in service`;
  });

  /** The category filter's value, for the select. */
  protected readonly category = computed(
    () => this.query.request().filters.category as ModelCategory | '',
  );
}

/** What the table shows of a model. */
function toRow(model: Model): ModelRow {
  return {
    model,
    categoryLabel: modelCategoryLabels[model.category],
    listValue: formatMoney(model.listValue, model.currency),
    depositRule: depositRuleShort(model.depositRule),
    depositPerUnit: formatMoney(model.depositPerUnit.amount, model.depositPerUnit.currency),
    photoUrl: model.photos[0]?.url ?? null,
  };
}
