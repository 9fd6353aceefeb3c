/** Designs as drawn and the builds of them: checked before anything is stored. */
import { parseDesign, TEMPLATES, makeDesignFromTemplate, withActualValues } from '../circuit';
import type { BuildRecord, DesignRecord, TemplateInfo } from '../contract/contract';
import type { RolloffStore } from '../store';
import { designOf } from '../read-model/stored-design';

export class Designs {
  constructor(private readonly store: RolloffStore) {}

  async listTemplates(): Promise<TemplateInfo[]> {
    return TEMPLATES;
  }

  async makeTemplate(templateId: string, parameters: Record<string, number>): Promise<unknown> {
    return makeDesignFromTemplate(templateId, parameters);
  }

  async saveDesign(design: unknown): Promise<DesignRecord> {
    const parsed = parseDesign(design, 'design');
    return this.store.saveDesign({ name: parsed.name, design });
  }

  async listDesigns(): Promise<DesignRecord[]> {
    return this.store.listDesigns();
  }

  async createBuild(build: { designId: number; label: string; notes: string; actualValues: Record<string, number> }): Promise<BuildRecord> {
    const design = await this.store.getDesign(build.designId);
    // Refuses unknown part ids or bad values before anything is stored.
    withActualValues(designOf(design), build.actualValues);
    return this.store.createBuild(build);
  }

  async listBuilds(designId?: number): Promise<BuildRecord[]> {
    return this.store.listBuilds(designId);
  }

  async getBuild(buildId: number): Promise<BuildRecord> {
    return this.store.getBuild(buildId);
  }
}
