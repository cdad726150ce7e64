import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { provideRouter } from '@angular/router';
import type { Photo } from '@evalon/contracts';
import { errorInterceptor } from '../../core/interceptors';
import { ModelPhotos, photoFileProblem } from './model-photos';

const stored: Photo = {
  id: 61,
  modelId: 41,
  contentType: 'image/jpeg',
  sizeBytes: 240_000,
  url: '/api/photos/61',
};

/** A file of `size` bytes with the given type (the bytes themselves do not matter here). */
function file(name: string, type: string, size: number): File {
  return new File([new Uint8Array(size)], name, { type });
}

describe('photoFileProblem', () => {
  it('takes JPEG, PNG and WebP up to 5 MB (5 × 1024 × 1024 bytes, the server’s limit)', () => {
    expect(
      photoFileProblem({ name: 'a.jpg', type: 'image/jpeg', size: 5 * 1024 * 1024 }),
    ).toBeNull();
    expect(photoFileProblem({ name: 'a.webp', type: 'image/webp', size: 10 })).toBeNull();
    expect(photoFileProblem({ name: 'a.png', type: 'image/png', size: 5 * 1024 * 1024 + 1 })).toBe(
      '“a.png” is 5.0 MB; photos can be 5 MB at most.',
    );
    expect(photoFileProblem({ name: 'scan.gif', type: 'image/gif', size: 10 })).toBe(
      '“scan.gif” is not a JPEG, PNG or WebP image.',
    );
  });
});

describe('ModelPhotos', () => {
  let fixture: ComponentFixture<ModelPhotos>;
  let loader: HarnessLoader;
  let root: HarnessLoader;
  let http: HttpTestingController;
  let emitted: Photo[][];

  async function settle(): Promise<void> {
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
  }

  beforeEach(async () => {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([errorInterceptor])),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    // jsdom has no object URLs; the preview only needs some address.
    URL.createObjectURL = jest.fn(() => 'blob:preview-1');
    URL.revokeObjectURL = jest.fn();
    fixture = TestBed.createComponent(ModelPhotos);
    fixture.componentRef.setInput('modelId', 41);
    fixture.componentRef.setInput('modelName', 'Dralvik U8 ureteroscope');
    fixture.componentRef.setInput('photos', [stored]);
    emitted = [];
    fixture.componentInstance.photosChange.subscribe((photos) => emitted.push(photos));
    loader = TestbedHarnessEnvironment.loader(fixture);
    root = TestbedHarnessEnvironment.documentRootLoader(fixture);
    await fixture.whenStable();
  });

  afterEach(() => http.verify());

  async function choose(chosen: File): Promise<void> {
    const input = fixture.nativeElement.querySelector('input[type="file"]') as HTMLInputElement;
    Object.defineProperty(input, 'files', {
      configurable: true,
      value: { item: () => chosen, length: 1, 0: chosen },
    });
    input.dispatchEvent(new Event('change'));
    await settle();
  }

  it('refuses a file of the wrong type before uploading anything', async () => {
    await choose(file('scan.gif', 'image/gif', 1000));
    expect(fixture.nativeElement.querySelector('[role="alert"]').textContent).toContain(
      '“scan.gif” is not a JPEG, PNG or WebP image.',
    );
    expect(fixture.nativeElement.querySelector('.preview')).toBeNull();
  });

  it('previews the chosen photo, then uploads it in the form field “photo”', async () => {
    const chosen = file('front.png', 'image/png', 2048);
    await choose(chosen);
    expect(fixture.nativeElement.querySelector('img.preview').getAttribute('src')).toBe(
      'blob:preview-1',
    );
    expect(fixture.nativeElement.querySelector('.pending-name').textContent).toContain('front.png');

    await (await loader.getHarness(MatButtonHarness.with({ text: /Add this photo/ }))).click();
    const request = http.expectOne('/api/models/41/photos');
    expect(request.request.method).toBe('POST');
    const sent = (request.request.body as FormData).get('photo') as File;
    expect([sent.name, sent.type, sent.size]).toEqual(['front.png', 'image/png', 2048]);
    const added: Photo = { ...stored, id: 62, contentType: 'image/png', url: '/api/photos/62' };
    request.flush({ photo: added }, { status: 201, statusText: 'Created' });
    await settle();
    expect(emitted).toEqual([[stored, added]]);
    expect(URL.revokeObjectURL).toHaveBeenCalledWith('blob:preview-1');
  });

  it('shows the server’s refusal of a photo', async () => {
    await choose(file('front.jpg', 'image/jpeg', 2048));
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add this photo/ }))).click();
    http.expectOne('/api/models/41/photos').flush(
      {
        error: {
          code: 'unsupported_photo_type',
          message: 'That file is not a JPEG, PNG or WebP image.',
        },
      },
      { status: 415, statusText: 'Unsupported Media Type' },
    );
    await settle();
    expect(fixture.nativeElement.querySelector('[role="alert"]').textContent).toContain(
      'That file is not a JPEG, PNG or WebP image.',
    );
    expect(emitted).toEqual([]);
  });

  it('deletes a photo only after confirmation', async () => {
    const remove = await loader.getHarness(
      MatButtonHarness.with({ selector: '[aria-label="Delete photo 1"]' }),
    );
    await remove.click();
    let dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe('Delete photo 1?');
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Cancel' }))).click();
    await settle();
    http.expectNone('/api/models/41/photos/61');

    await remove.click();
    dialog = await root.getHarness(MatDialogHarness);
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Delete photo' }))).click();
    const request = http.expectOne('/api/models/41/photos/61');
    expect(request.request.method).toBe('DELETE');
    request.flush(null, { status: 204, statusText: 'No Content' });
    await settle();
    expect(emitted).toEqual([[]]);
  });
});
