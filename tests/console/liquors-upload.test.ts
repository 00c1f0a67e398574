/**
 * Upload of a Dühring table: the server's line-numbered refusals (produced here by the real v1
 * CSV parser) are listed per line in the upload card, and the multipart body has the fields the
 * contract names.
 */
import { mount } from '@vue/test-utils';
import { describe, expect, it } from 'vitest';
import { createVuetify } from 'vuetify';
import * as components from 'vuetify/components';
import { ApiProblem } from '../../console/src/api/client.js';
import LiquorUploadCard from '../../console/src/components/liquors/LiquorUploadCard.vue';
import { uploadForm, uploadLineErrors } from '../../console/src/stores/liquors.js';
import { duhringFromCsv } from '../../server/liquors/index.js';
import { ProblemError } from '../../server/http/problem.js';

// Lines 3 and 5 are bad; counting lines from 1 with the header on line 1 (RFC 4180 §2: one record per line).
const csv = [
  'massFraction,waterBoilingPoint,solutionBoilingPoint',
  '0.2,50,51.2',
  '0.2,abc,101.5',
  '0.45,50,54.1',
  '1.3,100,105.0',
].join('\n');

function serverProblem(): ApiProblem {
  try {
    duhringFromCsv(csv);
  } catch (err) {
    const p = err as ProblemError;
    return new ApiProblem({
      status: p.status,
      type: `/problems/${p.type}`,
      title: p.title,
      detail: p.detail,
      errors: p.errors,
    });
  }
  throw new Error('the parser accepted a bad table');
}

describe('Dühring upload errors', () => {
  it('lists each refused CSV line by its number, in order', () => {
    const lines = uploadLineErrors(serverProblem().errors);
    // Source: RFC 4180 §2 (header record on line 1, then one record per line) applied to the table above (from memory)
    expect(lines.map((l) => l.line)).toEqual([3, 5]);
    // The server names the cell as `line 3, column waterBoilingPoint`: the column leads the message.
    expect(lines[0]!.message.startsWith('waterBoilingPoint: ')).toBe(true);
  });

  it('shows the line numbers and messages in the upload card', () => {
    const problem = serverProblem();
    const wrapper = mount(LiquorUploadCard, {
      props: {
        accounts: [{ title: 'Brine Works', value: 2 }],
        uploading: false,
        problem,
        lineErrors: uploadLineErrors(problem.errors),
      },
      global: { plugins: [createVuetify({ components })] },
    });
    const text = wrapper.get('[data-test="upload-errors"]').text();
    expect(text).toContain('Line 3:');
    expect(text).toContain('Line 5:');
    expect(text.indexOf('Line 3:')).toBeLessThan(text.indexOf('Line 5:'));
  });

  it('sends name, heat capacity and the file under the field names of the contract', () => {
    const form = uploadForm(
      { name: 'Spent wash (invented)', heatCapacity: '4.18,-2.4' },
      new Blob([csv]),
      'wash.csv',
    );
    // Source: shared/console/liquors.ts LiquorUploadFieldsSchema and the v1 multipart field "file"
    expect(form.get('name')).toBe('Spent wash (invented)');
    expect(form.get('heatCapacity')).toBe('4.18,-2.4');
    expect((form.get('file') as File).name).toBe('wash.csv');
    expect(form.has('id')).toBe(false);
  });
});

describe('Dühring upload form', () => {
  const mountCard = () =>
    mount(LiquorUploadCard, {
      props: {
        accounts: [{ title: 'Brine Works', value: 2 }],
        uploading: false,
        problem: null,
        lineErrors: [],
      },
      global: { plugins: [createVuetify({ components })] },
    });

  it('calls the heat capacity required, as the upload contract does, never optional', () => {
    const text = mountCard().text();
    expect(text).toContain('Heat capacity');
    expect(text).toContain('Required');
    expect(text).not.toMatch(/optional/i);
  });

  it('clears its fields once an upload has finished without a problem', async () => {
    const wrapper = mountCard();
    const inputs = () => wrapper.findAll('.v-text-field:not(.v-select) input');
    const [name, heat] = inputs();
    expect(inputs()).toHaveLength(2);
    await name!.setValue('Spent wash (invented)');
    await heat!.setValue('4.18,-2.4');
    await wrapper.setProps({ uploading: true } as never);
    await wrapper.setProps({ uploading: false } as never);
    const values = inputs().map((i) => (i.element as HTMLInputElement).value);
    expect(values).not.toContain('Spent wash (invented)');
    expect(values).not.toContain('4.18,-2.4');
  });

  it('keeps its fields when the upload was refused, so they can be corrected', async () => {
    const wrapper = mountCard();
    const [name] = wrapper.findAll('.v-text-field:not(.v-select) input');
    await name!.setValue('Spent wash (invented)');
    await wrapper.setProps({ uploading: true } as never);
    await wrapper.setProps({ uploading: false, problem: serverProblem() } as never);
    expect((name!.element as HTMLInputElement).value).toBe('Spent wash (invented)');
  });
});
