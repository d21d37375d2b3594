import { useEffect, useState } from 'react';

/** Whether the workspace tab panel `panel-${name}` is shown (screens stay mounted; hidden ones skip heavy work). */
export function usePanelVisible(name: string): boolean {
  const [visible, setVisible] = useState(false);
  useEffect(() => {
    const el = document.getElementById(`panel-${name}`);
    if (el === null) {
      setVisible(true);
      return;
    }
    const update = () => setVisible(!el.hidden);
    update();
    const observer = new MutationObserver(update);
    observer.observe(el, { attributes: true, attributeFilter: ['hidden'] });
    return () => observer.disconnect();
  }, [name]);
  return visible;
}
