import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  booleanAttribute,
  inject,
  input,
  output,
  signal,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTooltipModule } from '@angular/material/tooltip';
import type { Photo } from '@evalon/contracts';
import { firstValueFrom } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { confirmAction } from '../../shared/confirm-dialog/confirm-dialog';
import { LenderCatalogApi } from './lender-catalog-api';
import { maxPhotoBytes, photoContentTypes } from '@evalon/contracts/values';

/** A photo picked on this device, shown before it is uploaded. */
interface PendingPhoto {
  readonly file: File;
  /** Object URL of the file for the preview, or null where the browser cannot make one. */
  readonly previewUrl: string | null;
}

/**
 * Why a file cannot be a model photo, or null when it can. The server checks the bytes again;
 * this spares people an upload that would be refused (JPEG, PNG or WebP, at most 5 MB).
 */
export function photoFileProblem(file: Pick<File, 'type' | 'size' | 'name'>): string | null {
  if (!(photoContentTypes as readonly string[]).includes(file.type)) {
    return `“${file.name}” is not a JPEG, PNG or WebP image.`;
  }
  if (file.size > maxPhotoBytes) {
    const megabytes = (file.size / (1024 * 1024)).toFixed(1);
    return `“${file.name}” is ${megabytes} MB; photos can be 5 MB at most.`;
  }
  return null;
}

/** Photos of a model: thumbnails, add one with a preview first, delete with confirmation. */
@Component({
  selector: 'ev-model-photos',
  imports: [MatButtonModule, MatIconModule, MatProgressBarModule, MatTooltipModule],
  templateUrl: './model-photos.html',
  styleUrl: './model-photos.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ModelPhotos {
  private readonly api = inject(LenderCatalogApi);
  private readonly dialog = inject(MatDialog);
  private readonly notifier = inject(Notifier);

  /** The model the photos belong to. */
  readonly modelId = input.required<number>();
  /** Name of the model, for alternative texts. */
  readonly modelName = input('');
  /** Photos stored now. */
  readonly photos = input.required<readonly Photo[]>();
  /** Whether the person may add and delete photos. */
  readonly editable = input(true, { transform: booleanAttribute });
  /** The photos after an upload or a deletion. */
  readonly photosChange = output<Photo[]>();

  protected readonly accept = photoContentTypes.join(',');
  protected readonly pending = signal<PendingPhoto | null>(null);
  protected readonly problem = signal<string | null>(null);
  protected readonly uploading = signal(false);
  protected readonly deleting = signal<number | null>(null);

  constructor() {
    inject(DestroyRef).onDestroy(() => this.releasePreview());
  }

  protected choose(event: Event): void {
    const inputElement = event.target as HTMLInputElement;
    const file = inputElement.files?.item(0) ?? null;
    // Clear the input, so choosing the same file again still reports a change.
    inputElement.value = '';
    this.releasePreview();
    this.problem.set(null);
    if (!file) return;
    const problem = photoFileProblem(file);
    if (problem) {
      this.problem.set(problem);
      return;
    }
    const previewUrl = typeof URL.createObjectURL === 'function' ? URL.createObjectURL(file) : null;
    this.pending.set({ file, previewUrl });
  }

  protected discard(): void {
    this.releasePreview();
  }

  protected async upload(): Promise<void> {
    const pending = this.pending();
    if (!pending || this.uploading()) return;
    this.uploading.set(true);
    this.problem.set(null);
    try {
      const photo = await firstValueFrom(this.api.uploadPhoto(this.modelId(), pending.file));
      this.releasePreview();
      this.photosChange.emit([...this.photos(), photo]);
      this.notifier.success('Photo added.');
    } catch (error) {
      this.problem.set(messageOf(error));
    } finally {
      this.uploading.set(false);
    }
  }

  protected async remove(photo: Photo, position: number): Promise<void> {
    const confirmed = await firstValueFrom(
      confirmAction(this.dialog, {
        title: `Delete photo ${position}?`,
        message: 'Hospitals will no longer see this photo of the model. This cannot be undone.',
        confirmLabel: 'Delete photo',
        destructive: true,
      }),
    );
    if (!confirmed) return;
    this.deleting.set(photo.id);
    try {
      await firstValueFrom(this.api.deletePhoto(this.modelId(), photo.id), {
        defaultValue: undefined,
      });
      this.photosChange.emit(this.photos().filter((p) => p.id !== photo.id));
      this.notifier.success('Photo deleted.');
    } catch (error) {
      this.notifier.error(error);
    } finally {
      this.deleting.set(null);
    }
  }

  protected sizeOf(bytes: number): string {
    return bytes >= 1024 * 1024
      ? `${(bytes / (1024 * 1024)).toFixed(1)} MB`
      : `${Math.max(1, Math.round(bytes / 1024))} kB`;
  }

  private releasePreview(): void {
    const url = this.pending()?.previewUrl;
    if (url && typeof URL.revokeObjectURL === 'function') URL.revokeObjectURL(url);
    this.pending.set(null);
  }
}
