import { button } from './sheet-styles';

/** The button that opens the URDF import, drawn before and after its dialog has loaded. */
export default function UrdfOpenButton({ disabled, onOpen }: { disabled: boolean; onOpen: () => void }) {
  return (
    <button type="button" className={button} disabled={disabled} onClick={onOpen} data-testid="urdf-open" title="Read joint axes and origins from a robot description (URDF)">
      Import from URDF
    </button>
  );
}
