import { DestroyRef } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { FormArray, FormControl, FormGroup, Validators } from '@angular/forms';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { Router, provideRouter } from '@angular/router';
import { DepotListStore } from '../depot-state/depot-list-store';
import { NORTH_ID, SOUTH_ID, depot, southDepot } from '../testing/fixtures';
import { FormDrafts, restoreInto } from './form-drafts';

function settings(name = 'North Depot', load: number[] = [0]) {
  return new FormGroup({
    name: new FormControl(name, { nonNullable: true }),
    load: new FormArray(load.map((kw) => new FormControl<number | null>(kw, Validators.min(0)))),
  });
}

describe('FormDrafts', () => {
  let drafts: FormDrafts;
  let url = '/depot';
  const destroyed: (() => void)[] = [];
  const destroyRef = { onDestroy: (fn: () => void) => destroyed.push(fn) } as unknown as DestroyRef;

  beforeEach(() => {
    sessionStorage.clear();
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()],
    });
    vi.spyOn(TestBed.inject(Router), 'url', 'get').mockImplementation(() => url);
    drafts = TestBed.inject(FormDrafts);
  });

  it('keeps the changed forms on screen when the session ends and gives them back on the same page', () => {
    url = '/depot?x=1';
    const form = settings();
    expect(drafts.register('depot-settings', form, destroyRef)).toBe(false);
    form.controls.name.setValue('South Depot');
    form.markAsDirty();
    const untouched = settings('Other');
    drafts.register('other', untouched, destroyRef);
    drafts.keepAll();
    destroyed.splice(0).forEach((fn) => fn());

    url = '/depot';
    expect(drafts.has('depot-settings')).toBe(true);
    expect(drafts.has('other')).toBe(false);
    const again = settings();
    expect(drafts.register('depot-settings', again, destroyRef)).toBe(true);
    expect(again.controls.name.value).toBe('South Depot');
    expect(again.dirty).toBe(true);
    // Given back once: a later visit starts clean.
    expect(drafts.has('depot-settings')).toBe(false);
  });

  it('keeps nothing for a form that was saved or cancelled, nor on another page', () => {
    const form = settings();
    drafts.register('depot-settings', form, destroyRef);
    form.controls.name.setValue('Changed');
    form.markAsDirty();
    drafts.forget('depot-settings');
    drafts.keepAll();
    expect(drafts.has('depot-settings')).toBe(false);
    url = '/fleet';
    expect(drafts.has('depot-settings')).toBe(false);
  });

  it("keeps a draft for the depot it was typed on: another depot's form does not get it", async () => {
    const store = TestBed.inject(DepotListStore);
    const mock = TestBed.inject(HttpTestingController);
    const loading = store.load();
    mock.expectOne('/api/depots').flush({ depots: [depot(), southDepot()], chosenDepotId: NORTH_ID });
    await loading;
    const form = settings();
    drafts.register('depot-settings', form, destroyRef);
    form.controls.name.setValue('North Depot, renamed');
    form.markAsDirty();
    drafts.keepAll();
    destroyed.splice(0).forEach((fn) => fn());

    void store.choose(SOUTH_ID);
    mock.expectOne('/api/me/depot').flush({ chosenDepotId: SOUTH_ID });
    const south = settings('Riverside Depot');
    expect(drafts.register('depot-settings', south, destroyRef)).toBe(false);
    expect(south.controls.name.value).toBe('Riverside Depot');
    destroyed.splice(0).forEach((fn) => fn());

    void store.choose(NORTH_ID);
    mock.expectOne('/api/me/depot').flush({ chosenDepotId: NORTH_ID });
    const north = settings();
    expect(drafts.register('depot-settings', north, destroyRef)).toBe(true);
    expect(north.controls.name.value).toBe('North Depot, renamed');
  });

  it('restores lists of fields to the stored length, with the same validators', () => {
    const form = settings('A', [5]);
    restoreInto(form, { name: 'B', load: [1, 2, -3] });
    expect(form.getRawValue()).toEqual({ name: 'B', load: [1, 2, -3] });
    expect(form.controls.load.at(2).valid).toBe(false);
  });
});
