import { Thumbnails } from "@/components/uploads/thumbnails";
import { getDb } from "@/db";
import type { Item } from "@/lib/genealogy/graph";
import { listUploads } from "@/lib/uploads";
import { PhotoTarget } from "./photo-target";

/** Photos of the flitch and of its leaves, newest last, each leaf's under its number. */
export async function FlitchPhotos({ flitch, leaves }: { flitch: Item; leaves: { id: string; identity: string; seq: number }[] }) {
  const db = getDb();
  const own = await listUploads(db, { kind: "item", id: flitch.id }, "photo");
  const perLeaf = (await Promise.all(leaves.map(async (l) => ({ leaf: l, photos: await listUploads(db, { kind: "item", id: l.id }, "photo") })))).filter((x) => x.photos.length);
  return (
    <div className="flex flex-col gap-5">
      <PhotoTarget flitch={flitch.identity} leaves={leaves} />
      <div>
        <h3 className="mb-2 font-bold">The flitch</h3>
        <Thumbnails uploads={own} />
      </div>
      {perLeaf.map(({ leaf, photos }) => (
        <div key={leaf.id}>
          <h3 className="mb-2 font-bold">Leaf {leaf.seq}</h3>
          <Thumbnails uploads={photos} />
        </div>
      ))}
    </div>
  );
}
