import { CanDeactivateFn, Routes } from '@angular/router';
import { CatalogModels } from './catalog-models';
import { DepotsSettings } from './depots-settings';
import { ModelEditor } from './model-editor';

/** Asks before leaving the model editor with unsaved edits. */
export const modelEditorLeave: CanDeactivateFn<ModelEditor> = (editor) => editor.confirmLeave();

/** `/catalog`: the lender's models, the model editor, depots and shipping settings. */
export const catalogRoutes: Routes = [
  { path: '', component: CatalogModels, title: 'Catalog' },
  { path: 'depots', component: DepotsSettings, title: 'Depots and shipping' },
  {
    path: 'models/new',
    component: ModelEditor,
    title: 'New model',
    canDeactivate: [modelEditorLeave],
  },
  {
    path: 'models/:modelId',
    component: ModelEditor,
    title: 'Model',
    canDeactivate: [modelEditorLeave],
  },
];
